/** Image preparation: blur against scipy.ndimage, planes, relative contrast, binning. */
import { describe, expect, it } from 'vitest';
import { binImage, cropImage, fitPlane, gaussianBlur, planeValues, relativeContrast, removePlane, robustPlane, standardise } from '../../src/analysis/preprocess.js';
import { seededRandom } from '../../src/analysis/identifyRandom.js';
import { needPython, pythonJson } from '../python.js';

const scipy = needPython('numpy', 'scipy');

describe('gaussianBlur', () => {
  it('equals scipy.ndimage.gaussian_filter(mode="nearest", truncate=4) (python3-scipy)', (ctx) => {
    scipy.require(ctx);
    const w = 20;
    const h = 17;
    const r = seededRandom(2);
    const img = Array.from({ length: w * h }, () => r.normal());
    for (const sigma of [0.7, 1.1, 2.3]) {
      const ref = pythonJson<number[]>(
        'import json,sys,numpy as np\nfrom scipy.ndimage import gaussian_filter\nd=json.load(sys.stdin)\na=np.array(d["img"]).reshape(d["h"],d["w"])\nprint(json.dumps(gaussian_filter(a,d["s"],mode="nearest",truncate=4.0).ravel().tolist()))',
        { img, w, h, s: sigma },
      );
      const out = gaussianBlur(new Float64Array(w * h), img, w, h, sigma);
      let err = 0;
      for (let k = 0; k < ref.length; k++) err = Math.max(err, Math.abs(out[k] - ref[k]));
      expect(err).toBeLessThan(1e-12);
    }
  });

  it('keeps the mean of a periodic-free constant image and copies for sigma 0 (definition)', () => {
    const img = new Float64Array(30).fill(2.5);
    expect([...gaussianBlur(new Float64Array(30), img, 6, 5, 1.7)].every((v) => Math.abs(v - 2.5) < 1e-12)).toBe(true);
    const r = Float64Array.from({ length: 30 }, (_, i) => i);
    expect([...gaussianBlur(new Float64Array(30), r, 6, 5, 0)]).toEqual([...r]);
  });
});

describe('background planes', () => {
  const w = 40;
  const h = 30;
  const plane = (x: number, y: number) => 100 + 0.8 * (x - (w - 1) / 2) - 0.3 * (y - (h - 1) / 2);

  it('fitPlane recovers an exact plane (least squares, definition)', () => {
    const img = new Float64Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) img[y * w + x] = plane(x, y);
    const p = fitPlane(img, w, h);
    expect(p[0]).toBeCloseTo(100, 10);
    expect(p[1]).toBeCloseTo(0.8, 10);
    expect(p[2]).toBeCloseTo(-0.3, 10);
    const flat = removePlane(new Float64Array(w * h), img, w, h);
    expect(Math.max(...flat.map(Math.abs))).toBeLessThan(1e-9);
  });

  it('robustPlane ignores a strong dark band (sigma clipping, common practice) where a plain fit does not', () => {
    const r = seededRandom(8);
    const img = new Float64Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) img[y * w + x] = plane(x, y) * (1 + 0.01 * r.normal()) - (Math.abs(x - 30) < 2 ? 40 : 0);
    const robust = planeValues(new Float64Array(w * h), robustPlane(img, w, h), w, h);
    const plain = planeValues(new Float64Array(w * h), fitPlane(img, w, h), w, h);
    let eR = 0;
    let eP = 0;
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        eR = Math.max(eR, Math.abs(robust[y * w + x] - plane(x, y)));
        eP = Math.max(eP, Math.abs(plain[y * w + x] - plane(x, y)));
      }
    }
    // noise 1 % of 100 = 1 grey level; the band is 40 deep
    expect(eR).toBeLessThan(1);
    expect(eP).toBeGreaterThan(2);
  });

  it('relativeContrast returns I / B - 1 for a lit plane times (1 + c), and null when the offset removes the background', () => {
    const c = new Float64Array(w * h);
    c[15 * w + 10] = -0.3;
    c[15 * w + 11] = 0.2;
    const img = new Float64Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) img[y * w + x] = 7 + plane(x, y) * (1 + c[y * w + x]);
    const rel = relativeContrast({ width: w, height: h, data: img }, 7)!;
    for (let k = 0; k < w * h; k++) expect(rel.data[k]).toBeCloseTo(c[k], 9);
    expect(relativeContrast({ width: w, height: h, data: img }, 500)).toBeNull();
  });
});

describe('crop, bin, standardise', () => {
  it('cropImage takes [x, y, w, h] from the top-left; binImage averages blocks (definition)', () => {
    const img = { width: 5, height: 4, data: Float64Array.from({ length: 20 }, (_, i) => i) };
    expect([...cropImage(img, [1, 2, 3, 2]).data]).toEqual([11, 12, 13, 16, 17, 18]);
    expect(() => cropImage(img, [3, 0, 3, 1])).toThrow(RangeError);
    const b = binImage({ width: 5, height: 4, data: Float64Array.from(img.data) }, 2);
    expect([b.width, b.height]).toEqual([2, 2]);
    expect([...b.data]).toEqual([(0 + 1 + 5 + 6) / 4, (2 + 3 + 7 + 8) / 4, (10 + 11 + 15 + 16) / 4, (12 + 13 + 17 + 18) / 4]);
  });

  it('standardise gives zero mean and unit variance; a flat image gives zeros and std 0', () => {
    const r = seededRandom(1);
    const a = Float64Array.from({ length: 100 }, () => 5 + 3 * r.normal());
    const out = new Float64Array(100);
    expect(standardise(out, a)).toBeGreaterThan(1);
    const m = out.reduce((s, v) => s + v, 0) / 100;
    const v = out.reduce((s, x) => s + x * x, 0) / 100;
    expect(m).toBeCloseTo(0, 12);
    expect(v).toBeCloseTo(1, 12);
    expect(standardise(out, new Float64Array(100).fill(4))).toBe(0);
    expect(out.every((x) => x === 0)).toBe(true);
  });
});
