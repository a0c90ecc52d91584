import { it } from 'vitest';
import { createCorrelator, register } from '../../src/analysis/registration.js';
function rng(seed: number) { let s = seed >>> 0; return () => { s = (s * 1664525 + 1013904223) >>> 0; return s / 4294967296; }; }
it('reg', () => {
  const r = rng(3);
  const blobs = Array.from({ length: 25 }, () => ({ x: 10 + 76 * r(), y: 10 + 76 * r(), s: 2 + 4 * r(), a: r() - 0.3 }));
  const f = (x: number, y: number) => blobs.reduce((acc, b) => acc + b.a * Math.exp(-((x - b.x) ** 2 + (y - b.y) ** 2) / (2 * b.s * b.s)), 0);
  const W = 96, w = 64, cs = 47.5, ct = 31.5;
  const sim = new Float64Array(W * W);
  for (let y = 0; y < W; y++) for (let x = 0; x < W; x++) sim[y * W + x] = f(x, y);
  const cor = createCorrelator(w, w, W, W);
  for (const [dx, dy, th, sc] of [[3, -5, 0, 1], [2.3, 4.6, 0, 1], [-1.5, 2.2, 3.3, 1], [0.7, -2.1, -2.2, 1.03], [4, 4, 4.6, 0.96]]) {
    const t = new Float64Array(w * w);
    const c = Math.cos(th * Math.PI / 180) / sc, s = Math.sin(th * Math.PI / 180) / sc;
    for (let y = 0; y < w; y++) for (let x = 0; x < w; x++) {
      const px = x - ct - dx, py = y - ct - dy;
      t[y * w + x] = f(cs + c * px - s * py, cs + s * px + c * py);
    }
    const t0 = performance.now();
    const res = register(cor, cor.prepareTemplate(t), sim);
    console.log([dx, dy, th, sc].join(' '), '->', res.shiftX_px.toFixed(3), res.shiftY_px.toFixed(3), res.rotation_deg.toFixed(3), res.scale.toFixed(4), res.ncc.toFixed(5), res.evaluations, (performance.now() - t0).toFixed(1), 'ms');
  }
});
