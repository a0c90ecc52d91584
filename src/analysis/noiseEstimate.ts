/**
 * Pixel noise of a micrograph, estimated without any candidate, and a test
 * of whether a residual holds structure above that noise.
 *
 * Noise: Immerkaer 1996 ("Fast noise variance estimation", Computer Vision
 * and Image Understanding 64, 300): the image is convolved with the
 * difference of two Laplacian masks,
 *     N = [1 -2 1; -2 4 -2; 1 -2 1],
 * which annihilates constant, linear and (separably) quadratic intensity, so
 * what remains is mostly the noise; for white Gaussian noise of standard
 * deviation sigma, E|I * N| = sigma sqrt(36 * 2 / pi) ... written by
 * Immerkaer as
 *     sigma = sqrt(pi / 2) / (6 (W - 2)(H - 2)) * sum |I * N| .
 * Sharp image features (dislocation cores) raise the estimate a little; noise
 * correlated between neighbouring pixels (a detector's point spread) lowers it.
 *
 * Structured residual: the residual smoothed by a Gaussian of sigma_s pixels
 * keeps structure wider than a few pixels and averages white noise down to
 * the variance sigma^2 sum k^2 (k the smoothing kernel). The ratio
 *     structure = mean((k * r)^2) / (sigma^2 sum k^2)
 * is about 1 for a residual that is pure white noise and grows with
 * structure the model leaves unexplained.
 */
import { gaussianBlur } from './preprocess.js';

export function immerkaerSigma(img: ArrayLike<number>, w: number, h: number): number {
  if (w < 3 || h < 3) return 0;
  let s = 0;
  for (let y = 1; y < h - 1; y++) {
    for (let x = 1; x < w - 1; x++) {
      const k = y * w + x;
      const v =
        img[k - w - 1] - 2 * img[k - w] + img[k - w + 1] +
        -2 * img[k - 1] + 4 * img[k] - 2 * img[k + 1] +
        img[k + w - 1] - 2 * img[k + w] + img[k + w + 1];
      s += Math.abs(v);
    }
  }
  return (Math.sqrt(Math.PI / 2) * s) / (6 * (w - 2) * (h - 2));
}

/** Smoothing width of the structure test (pixels). */
export const STRUCTURE_SMOOTHING_PX = 1.5;

/** mean((k * r)^2) / (sigma^2 sum k^2), the border of 2 sigma_s pixels left out. */
export function structureRatio(resid: Float64Array, w: number, h: number, sigma: number, smoothing_px = STRUCTURE_SMOOTHING_PX): number {
  if (!(sigma > 0)) return Infinity;
  const sm = gaussianBlur(new Float64Array(w * h), resid, w, h, smoothing_px);
  // sum of squares of the discrete kernel: blur a unit impulse with the same function
  const n = 2 * Math.ceil(4 * smoothing_px) + 1;
  const delta = new Float64Array(n * n);
  delta[(n * n - 1) / 2] = 1;
  const k = gaussianBlur(new Float64Array(n * n), delta, n, n, smoothing_px);
  let k2 = 0;
  for (const v of k) k2 += v * v;
  const b = Math.ceil(2 * smoothing_px);
  let s = 0;
  let count = 0;
  for (let y = b; y < h - b; y++) {
    for (let x = b; x < w - b; x++) {
      s += sm[y * w + x] ** 2;
      count++;
    }
  }
  if (count === 0) return 1;
  return s / count / (sigma * sigma * k2);
}
