/**
 * Registration: the 2D FFT, the FFT-based normalised cross-correlation
 * (Lewis 1995, "Fast normalized cross-correlation") against its direct
 * definition, and recovery of known shifts, rotations and scale changes.
 */
import { describe, expect, it } from 'vitest';
import { fft2d } from '../../src/analysis/registrationFft.js';
import { createCorrelator, findPeak, register, transformImage } from '../../src/analysis/registration.js';
import { seededRandom } from '../../src/analysis/identifyRandom.js';

/** A smooth test scene: a sum of Gaussian blobs, known analytically everywhere. */
function blobScene(seed: number, extent: number) {
  const r = seededRandom(seed);
  const blobs = Array.from({ length: 30 }, () => ({ x: extent * r.uniform(), y: extent * r.uniform(), s: 2 + 4 * r.uniform(), a: r.uniform() - 0.35 }));
  return (x: number, y: number) => blobs.reduce((acc, b) => acc + b.a * Math.exp(-((x - b.x) ** 2 + (y - b.y) ** 2) / (2 * b.s * b.s)), 0);
}

describe('2D FFT (fft.js rows and columns)', () => {
  it('matches the direct DFT sum X(k,l) = sum x(m,n) exp(-2 pi i (k m / W + l n / H)) (definition)', () => {
    const W = 8;
    const H = 4;
    const r = seededRandom(5);
    const x = Float64Array.from({ length: 2 * W * H }, () => r.normal());
    const f = fft2d(W, H);
    const y = x.slice();
    f.forward(y);
    let maxErr = 0;
    for (let l = 0; l < H; l++) {
      for (let k = 0; k < W; k++) {
        let re = 0;
        let im = 0;
        for (let n = 0; n < H; n++) {
          for (let m = 0; m < W; m++) {
            const ph = -2 * Math.PI * ((k * m) / W + (l * n) / H);
            const a = x[2 * (n * W + m)];
            const b = x[2 * (n * W + m) + 1];
            re += a * Math.cos(ph) - b * Math.sin(ph);
            im += a * Math.sin(ph) + b * Math.cos(ph);
          }
        }
        maxErr = Math.max(maxErr, Math.abs(re - y[2 * (l * W + k)]), Math.abs(im - y[2 * (l * W + k) + 1]));
      }
    }
    expect(maxErr).toBeLessThan(1e-12);
    // inverse(forward(x)) = x
    f.inverse(y);
    for (let i = 0; i < x.length; i++) expect(y[i]).toBeCloseTo(x[i], 12);
  });

  it('the real-input and partial-row shortcuts give the same numbers as the full transform', () => {
    const W = 16;
    const H = 16;
    const r = seededRandom(9);
    const full = new Float64Array(2 * W * H);
    for (let y = 0; y < 11; y++) for (let x = 0; x < W; x++) full[2 * (y * W + x)] = r.normal();
    const f = fft2d(W, H);
    const a = full.slice();
    f.forward(a);
    const b = full.slice();
    f.forwardReal(b, 11);
    for (let i = 0; i < a.length; i++) expect(b[i]).toBeCloseTo(a[i], 11);
    const c = a.slice();
    f.inverse(c);
    const d = a.slice();
    f.inverseRows(d, 5);
    for (let i = 0; i < 2 * W * 5; i++) expect(d[i]).toBeCloseTo(c[i], 11);
  });
});

describe('normalised cross-correlation by FFT (Lewis 1995)', () => {
  it('equals the direct definition at every offset', () => {
    const w = 12;
    const h = 9;
    const W = 20;
    const H = 15;
    const r = seededRandom(11);
    const t = Float64Array.from({ length: w * h }, () => r.normal());
    const s = Float64Array.from({ length: W * H }, () => r.normal() + 3);
    const cor = createCorrelator(w, h, W, H);
    const map = cor.ncc(cor.prepareImage(s), cor.prepareTemplate(t), new Float64Array(cor.mapWidth * cor.mapHeight));
    const tm = t.reduce((a, b) => a + b, 0) / t.length;
    let maxErr = 0;
    for (let v = 0; v < cor.mapHeight; v++) {
      for (let u = 0; u < cor.mapWidth; u++) {
        let sm = 0;
        for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) sm += s[(v + y) * W + u + x];
        sm /= w * h;
        let num = 0;
        let dt = 0;
        let ds = 0;
        for (let y = 0; y < h; y++) {
          for (let x = 0; x < w; x++) {
            const a = t[y * w + x] - tm;
            const b = s[(v + y) * W + u + x] - sm;
            num += a * b;
            dt += a * a;
            ds += b * b;
          }
        }
        maxErr = Math.max(maxErr, Math.abs(num / Math.sqrt(dt * ds) - map[v * cor.mapWidth + u]));
      }
    }
    expect(maxErr).toBeLessThan(1e-10);
  });

  it('a flat simulation correlates with nothing (NCC 0, centred placement)', () => {
    const cor = createCorrelator(8, 8, 12, 12, 1e-5);
    const map = cor.ncc(cor.prepareImage(new Float64Array(144).fill(0.25)), cor.prepareTemplate(Float64Array.from({ length: 64 }, (_, i) => Math.sin(i))), new Float64Array(25));
    expect(Math.max(...map.map(Math.abs))).toBe(0);
    expect(findPeak(map, 5, 5)).toMatchObject({ x: 2, y: 2 });
  });
});

describe('registration recovers known transforms (Lewis 1995 NCC; rotation and scale by direct search, cf. Reddy & Chatterji 1996)', () => {
  const W = 96;
  const w = 64;
  const cs = (W - 1) / 2;
  const ct = (w - 1) / 2;
  const f = blobScene(3, W);
  const sim = new Float64Array(W * W);
  for (let y = 0; y < W; y++) for (let x = 0; x < W; x++) sim[y * W + x] = f(x, y);
  const cor = createCorrelator(w, w, W, W);

  /** The micrograph: the scene rotated by th (counter-clockwise on screen), scaled by sc, its content moved by (dx, dy) pixels. */
  function micrograph(dx: number, dy: number, th: number, sc: number, noise = 0, seed = 1) {
    const r = seededRandom(seed);
    const t = new Float64Array(w * w);
    const c = Math.cos((th * Math.PI) / 180) / sc;
    const s = Math.sin((th * Math.PI) / 180) / sc;
    for (let y = 0; y < w; y++) {
      for (let x = 0; x < w; x++) {
        const px = x - ct - dx;
        const py = y - ct - dy;
        t[y * w + x] = f(cs + c * px - s * py, cs + s * px + c * py) + noise * r.normal();
      }
    }
    return t;
  }

  // required accuracy (task specification): 1 pixel, 0.5 degree, 1 %; the shift-only cases are held to 0.1 px
  it.each([
    [3, -5, 0, 1],
    [-7, 2, 0, 1],
    [2.3, 4.6, 0, 1],
    [-1.5, 0.25, 0, 1],
  ])('pure shift (%f, %f): recovered to 0.1 pixel, no rotation or scale found', (dx, dy) => {
    const res = register(cor, cor.prepareTemplate(micrograph(dx, dy, 0, 1)), sim);
    expect(Math.abs(res.shiftX_px - dx)).toBeLessThan(0.1);
    expect(Math.abs(res.shiftY_px - dy)).toBeLessThan(0.1);
    expect(Math.abs(res.rotation_deg)).toBeLessThan(0.5);
    expect(Math.abs(res.scale - 1)).toBeLessThan(0.01);
    expect(res.ncc).toBeGreaterThan(0.99);
  });

  it.each([
    [-1.5, 2.2, 3.3, 1],
    [0.7, -2.1, -2.2, 1.03],
    [4, 4, 4.6, 0.96],
    [-3.2, 1.1, -4.1, 1.045],
    [1, -6, 1.4, 0.975],
  ])('shift (%f, %f), rotation %f deg, scale %f: within 1 px, 0.5 deg, 1 %', (dx, dy, th, sc) => {
    const res = register(cor, cor.prepareTemplate(micrograph(dx, dy, th, sc)), sim);
    expect(Math.abs(res.shiftX_px - dx)).toBeLessThan(1);
    expect(Math.abs(res.shiftY_px - dy)).toBeLessThan(1);
    expect(Math.abs(res.rotation_deg - th)).toBeLessThan(0.5);
    expect(Math.abs(res.scale - sc)).toBeLessThan(0.01);
  });

  it('still within 1 px, 0.5 deg, 1 % with noise (std 1/3 of the scene std)', () => {
    let sd = 0;
    const m = sim.reduce((a, b) => a + b, 0) / sim.length;
    for (const v of sim) sd += (v - m) ** 2;
    sd = Math.sqrt(sd / sim.length);
    const res = register(cor, cor.prepareTemplate(micrograph(2.5, -3.5, 2.7, 1.02, sd / 3, 4)), sim);
    expect(Math.abs(res.shiftX_px - 2.5)).toBeLessThan(1);
    expect(Math.abs(res.shiftY_px + 3.5)).toBeLessThan(1);
    expect(Math.abs(res.rotation_deg - 2.7)).toBeLessThan(0.5);
    expect(Math.abs(res.scale - 1.02)).toBeLessThan(0.01);
  });

  it('the registered window lies on the micrograph (NCC of window and micrograph equals the reported peak within 0.01)', () => {
    const t = micrograph(1.2, -2.4, 1.5, 1.01);
    const res = register(cor, cor.prepareTemplate(t), sim);
    const mean = (a: Float64Array) => a.reduce((x, y) => x + y, 0) / a.length;
    const ma = mean(t);
    const mb = mean(res.window);
    let num = 0;
    let da = 0;
    let db = 0;
    for (let k = 0; k < t.length; k++) {
      num += (t[k] - ma) * (res.window[k] - mb);
      da += (t[k] - ma) ** 2;
      db += (res.window[k] - mb) ** 2;
    }
    expect(Math.abs(num / Math.sqrt(da * db) - res.ncc)).toBeLessThan(0.01);
  });

  it('transformImage turns content counter-clockwise on the screen (x right, y down)', () => {
    // a single bright pixel right of the centre moves up (smaller y) for +90 degrees
    const n = 21;
    const img = new Float64Array(n * n);
    img[10 * n + 15] = 1;
    const out = transformImage(new Float64Array(n * n), img, n, n, 90, 1);
    const k = out.indexOf(Math.max(...out));
    expect([k % n, Math.floor(k / n)]).toEqual([10, 5]);
  });
});
