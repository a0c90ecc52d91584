/**
 * Image views (src/imaging/imageView.ts) against plain index arithmetic
 * written out here, and against numpy's slicing semantics recalled in the
 * comments (a[y0:y0+h, x0:x0+w], a[::-1, :], block means by reshape): the
 * container must not move a single pixel.
 */
import { describe, expect, it } from 'vitest';
import { binMean, cropView, flipRowsView, imageView, toFloat64 } from '../../src/imaging/imageView.js';

const W = 7;
const H = 5;
const data = Float64Array.from({ length: W * H }, (_, k) => k * 1.5 - 3);

describe('image views', () => {
  it('crop = a[y0:y0+h, x0:x0+w]', () => {
    const c = toFloat64(cropView(imageView(data, W, H), 2, 1, 4, 3));
    const expected: number[] = [];
    for (let y = 1; y < 4; y++) for (let x = 2; x < 6; x++) expected.push(data[y * W + x]);
    expect(Array.from(c)).toEqual(expected);
  });

  it('flip of rows = a[::-1, :], and a view: writing through it changes the source', () => {
    const copy = Float64Array.from(data);
    const v = flipRowsView(imageView(copy, W, H));
    const f = toFloat64(v);
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) expect(f[y * W + x]).toBe(data[(H - 1 - y) * W + x]);
    v.set(0, 0, 99);
    expect(copy[(H - 1) * W]).toBe(99);
  });

  it('2 x 2 block means = a[:4, :6].reshape(2, 2, 3, 2).mean(axis=(1, 3)) (partial blocks dropped)', () => {
    const b = binMean(imageView(data, W, H), 2);
    expect(b.shape).toEqual([2, 3]);
    for (let y = 0; y < 2; y++)
      for (let x = 0; x < 3; x++) {
        const m = (data[2 * y * W + 2 * x] + data[2 * y * W + 2 * x + 1] + data[(2 * y + 1) * W + 2 * x] + data[(2 * y + 1) * W + 2 * x + 1]) / 4;
        expect(b.get(y, x)).toBeCloseTo(m, 12);
      }
  });

  it('refuses a crop outside the image', () => {
    expect(() => cropView(imageView(data, W, H), 5, 0, 4, 1)).toThrow(RangeError);
  });
});
