/**
 * Two-dimensional complex FFT on interleaved (re, im) Float64Arrays, built
 * from npm fft.js's one-dimensional radix-4 transform: rows first, then
 * columns. Sizes are powers of two. The plan owns its scratch buffers, so a
 * transform allocates nothing. fft.js's inverse divides by n per axis, so
 * inverse(forward(x)) = x.
 */
import { fft1d } from '../math/fft1d.js';

/** Smallest power of two >= n (at least 2). */
export function nextPow2(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

export interface Fft2d {
  readonly width: number;
  readonly height: number;
  /** In place: data holds width*height complex values, row by row. */
  forward(data: Float64Array): void;
  inverse(data: Float64Array): void;
  /**
   * Forward transform of a real array (imaginary parts zero) whose rows from
   * `rows` on are all zero: two real rows go through one complex FFT, zero
   * rows are skipped. Same result as forward().
   */
  forwardReal(data: Float64Array, rows?: number): void;
  /** Inverse transform that computes only the first `rows` output rows (the rest is left undefined). */
  inverseRows(data: Float64Array, rows: number): void;
}

export function fft2d(width: number, height: number): Fft2d {
  const rowFft = fft1d(width);
  const colFft = width === height ? rowFft : fft1d(height);
  const rowIn = new Float64Array(2 * width);
  const rowOut = new Float64Array(2 * width);
  const colIn = new Float64Array(2 * height);
  const colOut = new Float64Array(2 * height);
  const rowPass = (data: Float64Array, inverse: boolean, rows: number) => {
    for (let y = 0; y < rows; y++) {
      const o = 2 * y * width;
      rowIn.set(data.subarray(o, o + 2 * width));
      if (inverse) rowFft.inverseTransform(rowOut, rowIn);
      else rowFft.transform(rowOut, rowIn);
      data.set(rowOut, o);
    }
  };
  const colPass = (data: Float64Array, inverse: boolean) => {
    for (let x = 0; x < width; x++) {
      for (let y = 0; y < height; y++) {
        const k = 2 * (y * width + x);
        colIn[2 * y] = data[k];
        colIn[2 * y + 1] = data[k + 1];
      }
      if (inverse) colFft.inverseTransform(colOut, colIn);
      else colFft.transform(colOut, colIn);
      for (let y = 0; y < height; y++) {
        const k = 2 * (y * width + x);
        data[k] = colOut[2 * y];
        data[k + 1] = colOut[2 * y + 1];
      }
    }
  };
  // two real rows a, b as one complex row z = a + i b: A_k = (Z_k + conj Z_{N-k}) / 2, B_k = (Z_k - conj Z_{N-k}) / (2 i)
  const realRowPairs = (data: Float64Array, rows: number) => {
    for (let y = 0; y < rows; y += 2) {
      const oa = 2 * y * width;
      const ob = oa + 2 * width;
      const hasB = y + 1 < rows;
      for (let x = 0; x < width; x++) {
        rowIn[2 * x] = data[oa + 2 * x];
        rowIn[2 * x + 1] = hasB ? data[ob + 2 * x] : 0;
      }
      rowFft.transform(rowOut, rowIn);
      for (let k = 0; k < width; k++) {
        const j = (width - k) % width;
        const zr = rowOut[2 * k];
        const zi = rowOut[2 * k + 1];
        const cr = rowOut[2 * j];
        const ci = -rowOut[2 * j + 1];
        data[oa + 2 * k] = 0.5 * (zr + cr);
        data[oa + 2 * k + 1] = 0.5 * (zi + ci);
        if (hasB) {
          data[ob + 2 * k] = 0.5 * (zi - ci);
          data[ob + 2 * k + 1] = -0.5 * (zr - cr);
        }
      }
    }
  };
  return {
    width,
    height,
    forward: (d) => {
      rowPass(d, false, height);
      colPass(d, false);
    },
    inverse: (d) => {
      rowPass(d, true, height);
      colPass(d, true);
    },
    forwardReal: (d, rows = height) => {
      realRowPairs(d, Math.min(rows, height));
      colPass(d, false);
    },
    inverseRows: (d, rows) => {
      colPass(d, true);
      rowPass(d, true, Math.min(rows, height));
    },
  };
}
