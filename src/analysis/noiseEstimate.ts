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
 * structure the model leaves unexplained. Its scatter for pure noise is
 * sqrt(2 / N_eff), N_eff = N / (2 pi sigma_s^2) independent samples among N
 * pixels (the smoothed field's correlation is exp(-d^2 / (4 sigma_s^2)), the
 * sum of its square over all lags 2 pi sigma_s^2; continuous approximation).
 *
 * Unexplained fraction: the same smoothed power of the micrograph c, with the
 * noise's share taken out of both,
 *     unexplained = (mean((k * r)^2) - sigma^2 sum k^2) / (mean((k * c)^2) - sigma^2 sum k^2),
 * is the fraction of the micrograph's structure (noise removed) that the
 * model leaves, about 0 for a model that explains it, 1 for a flat model,
 * above 1 for one that adds contrast the micrograph does not show. Unlike
 * the structure ratio it does not grow with the signal-to-noise ratio for a
 * fixed relative misfit. The denominator is kept at least the noise scatter
 * of the micrograph's own ratio (structure below that is not structure).
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

/** Sum of squares of the discrete smoothing kernel: a unit impulse blurred with the same function. */
function kernelSquareSum(smoothing_px: number): number {
  const n = 2 * Math.ceil(4 * smoothing_px) + 1;
  const delta = new Float64Array(n * n);
  delta[(n * n - 1) / 2] = 1;
  const k = gaussianBlur(new Float64Array(n * n), delta, n, n, smoothing_px);
  let k2 = 0;
  for (const v of k) k2 += v * v;
  return k2;
}

/** Mean square of img smoothed by the Gaussian, over the interior (a border of 2 sigma_s pixels left out), and the pixel count. */
function smoothedPower(img: Float64Array, w: number, h: number, smoothing_px: number): { power: number; count: number } {
  const sm = gaussianBlur(new Float64Array(w * h), img, w, h, smoothing_px);
  const b = Math.ceil(2 * smoothing_px);
  let s = 0;
  let count = 0;
  for (let y = b; y < h - b; y++) {
    for (let x = b; x < w - b; x++) {
      s += sm[y * w + x] ** 2;
      count++;
    }
  }
  return { power: count > 0 ? s / count : 0, count };
}

/** Standard deviation of the structure ratio of pure white noise over `count` pixels: sqrt(2 / N_eff), N_eff = count / (2 pi sigma_s^2). */
export function structureNullSd(count: number, smoothing_px = STRUCTURE_SMOOTHING_PX): number {
  return Math.sqrt((4 * Math.PI * smoothing_px * smoothing_px) / Math.max(1, count));
}

export interface ResidualStructure {
  /** Structure ratio of the residual (about 1: noise only). */
  readonly structure: number;
  /** Fraction of the micrograph's smoothed structure, noise removed, that the residual keeps (0: all explained, 1: none). */
  readonly unexplained: number;
}

/**
 * Structure ratio of a residual, mean((k * r)^2) / (sigma^2 sum k^2) with the border of 2 sigma_s pixels left
 * out, and the unexplained fraction of the micrograph's structure (module comment).
 */
export function residualStructure(resid: Float64Array, micrograph: Float64Array, w: number, h: number, sigma: number, smoothing_px = STRUCTURE_SMOOTHING_PX): ResidualStructure {
  const r = smoothedPower(resid, w, h, smoothing_px);
  const c = smoothedPower(micrograph, w, h, smoothing_px);
  if (r.count === 0) return { structure: 1, unexplained: 0 };
  const pn = sigma * sigma * kernelSquareSum(smoothing_px);
  if (!(pn > 0)) {
    // no noise: the plain fraction of the smoothed power
    return { structure: r.power > 0 ? Infinity : 1, unexplained: c.power > 0 ? r.power / c.power : 0 };
  }
  const floor = structureNullSd(c.count, smoothing_px) * pn;
  return { structure: r.power / pn, unexplained: (r.power - pn) / Math.max(c.power - pn, floor) };
}
