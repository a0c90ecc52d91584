import { describe, expect, it } from 'vitest';
import { superpose } from '../../src/elasticity/field.js';
import { straightDislocation } from '../../src/elasticity/straightDislocation.js';
import { sphericalInclusion } from '../../src/elasticity/inclusion.js';
import { maxAbsDiff, rng } from './helpers.js';

describe('superpose (linear elasticity: displacements add)', () => {
  it('displacement and gradient are the sums of the parts, call after call', () => {
    const a = straightDislocation({ b_nm: [0.18, -0.18, 0], line: [1, 1, -2], point_nm: [0, 0, 0], poissonRatio: 0.34 });
    const b = straightDislocation({ b_nm: [0, 0.18, 0.18], line: [0, 1, 1], point_nm: [2, -1, 0], poissonRatio: 0.34 });
    const c = sphericalInclusion({ centre_nm: [5, 5, 5], radius_nm: 2, strain: 0.01, poissonRatio: 0.34 });
    const s = superpose([a, b, c]);
    const r = rng(1);
    const parts = [a, b, c];
    const d = new Float64Array(3);
    const g = new Float64Array(9);
    const sd = new Float64Array(3);
    const sg = new Float64Array(9);
    for (let i = 0; i < 100; i++) {
      const p: [number, number, number] = [20 * r() - 10, 20 * r() - 10, 20 * r() - 10];
      const wd = [0, 0, 0];
      const wg = [0, 0, 0, 0, 0, 0, 0, 0, 0];
      for (const f of parts) {
        f.displacement(d, ...p);
        f.gradient(g, ...p);
        for (let k = 0; k < 3; k++) wd[k] += d[k];
        for (let k = 0; k < 9; k++) wg[k] += g[k];
      }
      sd.fill(123);
      sg.fill(123);
      s.displacement(sd, ...p);
      s.gradient(sg, ...p);
      expect(maxAbsDiff(sd, wd)).toBeLessThan(1e-14);
      expect(maxAbsDiff(sg, wg)).toBeLessThan(1e-14);
    }
  });

  it('an empty list is the zero field', () => {
    const s = superpose([]);
    const d = new Float64Array(3).fill(7);
    const g = new Float64Array(9).fill(7);
    s.displacement(d, 1, 2, 3);
    s.gradient(g, 1, 2, 3);
    expect([...d, ...g].every((v) => v === 0)).toBe(true);
  });
});

describe('directional derivative g.(grad R).k used for beta\'', () => {
  it('equals sum_ij g_i dR_i/dx_j k_j from the full gradient, for dislocations, inclusions and their sum', async () => {
    const { straightDislocation } = await import('../../src/elasticity/straightDislocation.js');
    const { sphericalInclusion } = await import('../../src/elasticity/inclusion.js');
    const { superpose } = await import('../../src/elasticity/field.js');
    const fields = [
      straightDislocation({ b_nm: [0.2, 0.1, -0.05], line: [1, 2, 3], point_nm: [1, -2, 0.5], poissonRatio: 0.31, cutDirection: [3, 0, -1] }),
      sphericalInclusion({ centre_nm: [2, 1, 0], radius_nm: 3, strain: 0.01, poissonRatio: 0.3 }),
    ];
    const all = [...fields, superpose(fields)];
    const g: [number, number, number] = [3.1, -2.2, 0.7];
    const k: [number, number, number] = [0.3, 0.4, Math.sqrt(1 - 0.25)];
    const G = new Float64Array(9);
    let seed = 7;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) * 20 - 10;
    for (const f of all) {
      const d = f.directional(g, k);
      for (let n = 0; n < 200; n++) {
        const x = rnd(), y = rnd(), z = rnd();
        f.gradient(G, x, y, z);
        let want = 0;
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) want += g[i] * G[3 * i + j] * k[j];
        // identical algebra in a different order: agreement to rounding (common practice)
        expect(Math.abs(d(x, y, z) - want)).toBeLessThan(1e-12 * (1 + Math.abs(want)));
      }
    }
  });
});
