/**
 * Image preparation before comparison: crop, bin, background plane, relative
 * contrast, zero-mean / unit-variance normalisation, Gaussian blur. Plain
 * functions on Float64Array grids (row by row, top row first); crop and bin
 * go through the ndarray views of imaging/imageView.ts.
 *
 * Relative contrast is what makes simulations and micrographs comparable:
 * c = I / B - 1 with B the background (for a micrograph: a plane fitted to the
 * pixels away from the defect; for a simulation: the perfect-crystal
 * intensity). It needs pixel values proportional to intensity (a linear
 * detector, the dark level removed).
 */

import { binMean, cropView, imageView, toFloat64 } from '../imaging/imageView.js';

export interface Grid {
  readonly width: number;
  readonly height: number;
  readonly data: Float64Array;
}

export interface ImageLike {
  readonly width: number;
  readonly height: number;
  readonly data: ArrayLike<number>;
}

/** Crop [x, y, w, h] (pixels, x to the right, y down, from the top-left corner); the caller checks the bounds. */
export function cropImage(src: ImageLike, crop: readonly [number, number, number, number]): Grid {
  const [x0, y0, w, h] = crop;
  if (x0 < 0 || y0 < 0 || w < 1 || h < 1 || x0 + w > src.width || y0 + h > src.height) {
    throw new RangeError(`cropImage: [${crop.join(', ')}] is outside the ${src.width} x ${src.height} image`);
  }
  return { width: w, height: h, data: toFloat64(cropView(imageView(src.data as Float64Array, src.width, src.height), x0, y0, w, h)) };
}

/** Average blocks of f x f pixels (a partial block at the right or bottom edge is dropped). */
export function binImage(src: Grid, f: number): Grid {
  if (!(Number.isInteger(f) && f >= 1)) throw new RangeError(`binImage: factor must be a positive integer, got ${f}`);
  if (f === 1) return src;
  const out = binMean(imageView(src.data, src.width, src.height), f);
  return { width: out.shape[1], height: out.shape[0], data: out.data };
}

/**
 * Least-squares plane c0 + cx X + cy Y through the pixels (X, Y centred pixel
 * coordinates), optionally only over pixels with mask[k] = 1.
 */
export function fitPlane(data: ArrayLike<number>, w: number, h: number, mask?: Uint8Array): [number, number, number] {
  // normal equations of the 3-parameter fit, solved by Cramer's rule
  let n = 0, sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0, sv = 0, sxv = 0, syv = 0;
  const cx = (w - 1) / 2;
  const cy = (h - 1) / 2;
  for (let y = 0; y < h; y++) {
    const Y = y - cy;
    for (let x = 0; x < w; x++) {
      const k = y * w + x;
      if (mask !== undefined && mask[k] === 0) continue;
      const X = x - cx;
      const v = data[k];
      n++;
      sx += X; sy += Y; sxx += X * X; syy += Y * Y; sxy += X * Y;
      sv += v; sxv += X * v; syv += Y * v;
    }
  }
  if (n === 0) return [0, 0, 0];
  const det3 = (a: number[]) => a[0] * (a[4] * a[8] - a[5] * a[7]) - a[1] * (a[3] * a[8] - a[5] * a[6]) + a[2] * (a[3] * a[7] - a[4] * a[6]);
  const A = [n, sx, sy, sx, sxx, sxy, sy, sxy, syy];
  const D = det3(A);
  if (Math.abs(D) < 1e-12 * Math.max(1, n * sxx * syy)) return [sv / n, 0, 0];
  const c0 = det3([sv, sx, sy, sxv, sxx, sxy, syv, sxy, syy]) / D;
  const c1 = det3([n, sv, sy, sx, sxv, sxy, sy, syv, syy]) / D;
  const c2 = det3([n, sx, sv, sx, sxx, sxv, sy, sxy, syv]) / D;
  return [c0, c1, c2];
}

/** Evaluate a plane from fitPlane at every pixel into out. */
export function planeValues(out: Float64Array, plane: readonly number[], w: number, h: number): Float64Array {
  const cx = (w - 1) / 2;
  const cy = (h - 1) / 2;
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) out[y * w + x] = plane[0] + plane[1] * (x - cx) + plane[2] * (y - cy);
  return out;
}

/**
 * Background plane that ignores the defect: fit, drop pixels more than 2.5
 * robust standard deviations (1.4826 x median absolute deviation) from the
 * plane, refit; five rounds (iterative sigma clipping, common practice).
 */
export function robustPlane(data: ArrayLike<number>, w: number, h: number): [number, number, number] {
  const n = w * h;
  const mask = new Uint8Array(n).fill(1);
  const res = new Float64Array(n);
  const plane = new Float64Array(n);
  let p = fitPlane(data, w, h);
  for (let round = 0; round < 5; round++) {
    planeValues(plane, p, w, h);
    for (let k = 0; k < n; k++) res[k] = Math.abs(data[k] - plane[k]);
    const sorted = Float64Array.from(res).sort();
    const sigma = 1.4826 * sorted[Math.floor(n / 2)];
    if (!(sigma > 0)) break;
    let kept = 0;
    for (let k = 0; k < n; k++) {
      mask[k] = res[k] <= 2.5 * sigma ? 1 : 0;
      kept += mask[k];
    }
    if (kept < Math.max(3, n / 4)) break;
    p = fitPlane(data, w, h, mask);
  }
  return p;
}

/**
 * Relative contrast c = (v - offset) / B - 1, B the background of
 * (v - offset): the robust plane; if that is not positive everywhere (very
 * few counts), the plain least-squares plane; if that is not either, the
 * mean. Returns null when even the mean is not positive (the offset is wrong
 * or the values are not proportional to intensity).
 */
export function relativeContrast(src: Grid, offset: number): Grid | null {
  const { width: w, height: h } = src;
  const n = w * h;
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = src.data[k] - offset;
  let mean = 0;
  for (let k = 0; k < n; k++) mean += v[k];
  mean /= n;
  const B = new Float64Array(n);
  const positive = () => B.every((b) => b > 0);
  planeValues(B, robustPlane(v, w, h), w, h);
  if (!positive()) planeValues(B, fitPlane(v, w, h), w, h);
  if (!positive()) B.fill(mean);
  if (!positive()) return null;
  for (let k = 0; k < n; k++) v[k] = v[k] / B[k] - 1;
  return { width: w, height: h, data: v };
}

/** out = data minus its least-squares plane (the projection orthogonal to 1, X, Y). */
export function removePlane(out: Float64Array, data: ArrayLike<number>, w: number, h: number): Float64Array {
  const p = fitPlane(data, w, h);
  const cx = (w - 1) / 2;
  const cy = (h - 1) / 2;
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
    const k = y * w + x;
    out[k] = data[k] - (p[0] + p[1] * (x - cx) + p[2] * (y - cy));
  }
  return out;
}

/** out = (data - mean) / std; returns the standard deviation (0 for a flat image, then out is all 0). */
export function standardise(out: Float64Array, data: ArrayLike<number>): number {
  const n = data.length;
  let m = 0;
  for (let k = 0; k < n; k++) m += data[k];
  m /= n;
  let v = 0;
  for (let k = 0; k < n; k++) v += (data[k] - m) * (data[k] - m);
  const sd = Math.sqrt(v / n);
  const tiny = 1e-12 * Math.max(1, Math.abs(m));
  if (!(sd > tiny)) {
    out.fill(0);
    return 0;
  }
  for (let k = 0; k < n; k++) out[k] = (data[k] - m) / sd;
  return sd;
}

/**
 * Separable Gaussian blur with standard deviation sigma_px (pixels), kernel
 * of radius floor(4 sigma + 0.5) normalised to 1, edges extended with the
 * nearest pixel (the same kernel and edges as scipy.ndimage.gaussian_filter
 * with truncate=4, mode='nearest'). sigma 0 copies.
 */
export function gaussianBlur(out: Float64Array, data: ArrayLike<number>, w: number, h: number, sigma_px: number): Float64Array {
  if (!(sigma_px > 0)) {
    for (let k = 0; k < w * h; k++) out[k] = data[k];
    return out;
  }
  const r = Math.max(1, Math.floor(4 * sigma_px + 0.5));
  const kern = new Float64Array(2 * r + 1);
  let s = 0;
  for (let i = -r; i <= r; i++) s += kern[i + r] = Math.exp(-(i * i) / (2 * sigma_px * sigma_px));
  for (let i = 0; i < kern.length; i++) kern[i] /= s;
  const tmp = new Float64Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let a = 0;
      for (let i = -r; i <= r; i++) a += kern[i + r] * data[y * w + Math.min(w - 1, Math.max(0, x + i))];
      tmp[y * w + x] = a;
    }
  }
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      let a = 0;
      for (let i = -r; i <= r; i++) a += kern[i + r] * tmp[Math.min(h - 1, Math.max(0, y + i)) * w + x];
      out[y * w + x] = a;
    }
  }
  return out;
}

/** Bilinear sample at (x, y) in pixel coordinates (pixel centres at integers), edges clamped. */
export function bilinear(data: ArrayLike<number>, w: number, h: number, x: number, y: number): number {
  const xc = Math.min(w - 1, Math.max(0, x));
  const yc = Math.min(h - 1, Math.max(0, y));
  const x0 = Math.min(w - 2, Math.floor(xc));
  const y0 = Math.min(h - 2, Math.floor(yc));
  if (w < 2 || h < 2) return data[Math.round(yc) * w + Math.round(xc)];
  const fx = xc - x0;
  const fy = yc - y0;
  const k = y0 * w + x0;
  return (1 - fy) * ((1 - fx) * data[k] + fx * data[k + 1]) + fy * ((1 - fx) * data[k + w] + fx * data[k + w + 1]);
}

/** A registration's window with its best-fitting plane removed (what is compared with the micrograph's contrast). */
export function planeRemoved(m: { readonly width: number; readonly height: number }, reg: { readonly window: Float64Array }): Float64Array {
  return removePlane(new Float64Array(reg.window.length), reg.window, m.width, m.height);
}
