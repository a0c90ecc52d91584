/**
 * One-dimensional complex FFT from npm fft.js (radix-4, interleaved (re, im)
 * Float64Arrays, sizes powers of two >= 2). fft.js's forward transform has
 * the - sign, e^{-2 pi i j m / n}; its inverse the + sign and divides by n.
 */
// CommonJS: its module.exports is the default import (Node and esbuild alike; types in fft.js.d.ts)
import FFT from 'fft.js';

export interface Fft1d {
  transform(out: Float64Array, data: Float64Array): void;
  inverseTransform(out: Float64Array, data: Float64Array): void;
}

/** A transform of `size` points (a power of two, at least 2). */
export function fft1d(size: number): Fft1d {
  return new FFT(size);
}

const plans = new Map<number, { fft: Fft1d; a: Float64Array; b: Float64Array }>();

/**
 * In place, with the + sign and no normalisation: (re, im)[j] <- sum_m (re, im)[m] e^{+2 pi i j m / n}
 * (n = re.length, a power of two; for set-up work, not hot loops).
 */
export function fftPlusInPlace(re: Float64Array, im: Float64Array): void {
  const n = re.length;
  let p = plans.get(n);
  if (p === undefined) {
    p = { fft: fft1d(n), a: new Float64Array(2 * n), b: new Float64Array(2 * n) };
    plans.set(n, p);
  }
  const { fft, a, b } = p;
  for (let j = 0; j < n; j++) {
    a[2 * j] = re[j];
    a[2 * j + 1] = im[j];
  }
  fft.inverseTransform(b, a);
  for (let j = 0; j < n; j++) {
    re[j] = b[2 * j] * n;
    im[j] = b[2 * j + 1] * n;
  }
}
