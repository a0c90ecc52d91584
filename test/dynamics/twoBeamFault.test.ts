import { describe, expect, it } from 'vitest';
import {
  applyFaultPhase,
  applySlab,
  integrateColumn,
  perfectCrystal,
  type TwoBeamParams,
} from '../../src/dynamics/twoBeam.js';
import { rk4Column } from '../../src/dynamics/rk4Reference.js';
import { intensities, maxAbsDiff } from './twoBeamReference.js';

/*
 * Fault convention (derived in src/dynamics/twoBeamColumn.ts): in the beta
 * form of physics.md section 3 a step of g.R by Delta at depth z0 multiplies
 * phig by exp(+2 pi i Delta), i.e. the fault matrix is diag(1, e^{+i alpha})
 * with alpha = 2 pi g.(R_below - R_above).
 */

const p: TwoBeamParams = { xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: 0.01 };
const t = 100;
const z0 = 37.2;
const delta = 1 / 3; // g.R_f of an fcc stacking fault (physics.md section 5)
const alpha = 2 * Math.PI * delta;
const none = new Float64Array(0);

/** Exit amplitudes with the fault matrix diag(1, e^{i sign alpha}) at z0, built by hand from slabs. */
function faultByHand(sign: number): Float64Array {
  const st = new Float64Array([1, 0, 0, 0]);
  applySlab(st, p, p.s_per_nm, z0);
  applyFaultPhase(st, sign * alpha);
  applySlab(st, p, p.s_per_nm, t - z0);
  return st;
}

describe('planar fault phase: beta form and fault matrix agree', () => {
  const plus = faultByHand(+1);
  const minus = faultByHand(-1);

  it('the two signs give different images here, so the test can tell them apart', () => {
    expect(maxAbsDiff(plus, minus)).toBeGreaterThan(0.1);
  });

  it('a linear ramp of g.R of width w (exact slabs) tends to diag(1, e^{+i alpha}) as w -> 0', () => {
    // beta' = delta / w on [z0 - w/2, z0 + w/2], zero elsewhere; the ramp ends
    // are passed as breakpoints (faults with alpha = 0), so every slice has a
    // constant beta' and is exact.
    const out = new Float64Array(4);
    const errs: number[] = [];
    for (const w of [1, 0.1, 0.01, 0.001]) {
      const a = z0 - w / 2;
      const b = z0 + w / 2;
      const bp = (z: number): number => (z > a && z < b ? delta / w : 0);
      integrateColumn(out, p, t, bp, new Float64Array([a, 0, b, 0]), 1e-8);
      errs.push(maxAbsDiff(out, plus));
      expect(maxAbsDiff(out, minus)).toBeGreaterThan(0.1);
    }
    // first order in w: ten times narrower, about ten times closer
    for (let k = 1; k < errs.length; k++) expect(errs[k]).toBeLessThan(errs[k - 1] / 5);
    expect(errs[errs.length - 1]).toBeLessThan(1e-4);
  });

  it('a smooth Lorentzian ramp (adaptive slicing, checked by RK4) tends to the same matrix', () => {
    // g.R = delta (1/2 + atan((z - z0)/w)/pi): beta' = delta / (pi w (1 + ((z - z0)/w)^2))
    const out = new Float64Array(4);
    const rk = new Float64Array(4);
    const errs: number[] = [];
    for (const w of [1, 0.1, 0.01]) {
      const bp = (z: number): number => {
        const u = (z - z0) / w;
        return delta / (Math.PI * w * (1 + u * u));
      };
      integrateColumn(out, p, t, bp, none, 1e-7);
      // independent check of the smooth column: plain RK4, h = w/30 (rk4Reference.ts)
      rk4Column(rk, p, t, bp, Math.ceil(t / (w / 30)));
      expect(maxAbsDiff(out, rk)).toBeLessThan(1e-6);
      errs.push(maxAbsDiff(out, plus));
      expect(maxAbsDiff(out, minus)).toBeGreaterThan(0.1);
    }
    expect(errs[1]).toBeLessThan(errs[0] / 3);
    expect(errs[2]).toBeLessThan(errs[1] / 3);
    expect(errs[2]).toBeLessThan(1e-2);
  });

  it('integrateColumn places the fault exactly at its depth (same as the hand-built product)', () => {
    const out = new Float64Array(4);
    integrateColumn(out, p, t, () => 0, new Float64Array([z0, alpha]), 1e-4);
    expect(maxAbsDiff(out, plus)).toBeLessThan(1e-13);
  });
});

describe('invisible faults', () => {
  const perfect = new Float64Array(4);
  perfectCrystal(perfect, p, t);
  const out = new Float64Array(4);

  it('alpha = 2 pi n is invisible (g.R_f integer, physics.md section 5)', () => {
    for (const n of [1, -2, 3]) {
      integrateColumn(out, p, t, () => 0, new Float64Array([z0, 2 * Math.PI * n]), 1e-4);
      expect(maxAbsDiff(out, perfect)).toBeLessThan(1e-12);
    }
  });

  it('a fault at the entrance (z = 0) or exit (z = t) surface is invisible', () => {
    integrateColumn(out, p, t, () => 0, new Float64Array([0, alpha]), 1e-4);
    expect(maxAbsDiff(out, perfect)).toBeLessThan(1e-14);
    integrateColumn(out, p, t, () => 0, new Float64Array([t, alpha]), 1e-4);
    // only the phase of phig changes: intensities unchanged
    const [i0, ig] = intensities(out);
    const [p0, pg] = intensities(perfect);
    expect(Math.abs(i0 - p0)).toBeLessThan(1e-14);
    expect(Math.abs(ig - pg)).toBeLessThan(1e-14);
    // faults outside the foil do not cut the column
    integrateColumn(out, p, t, () => 0, new Float64Array([-5, alpha, t + 5, alpha]), 1e-4);
    expect(maxAbsDiff(out, perfect)).toBeLessThan(1e-14);
  });
});

describe('inclined stacking fault, two-beam with absorption (Hashimoto, Howie & Whelan 1962)', () => {
  const thick = 150; // 5 xi_g
  const q = (s: number): TwoBeamParams => ({ xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: s });
  const a = new Float64Array(4);
  const b = new Float64Array(4);

  it('bright-field fringes are symmetric about the foil centre, dark-field ones are not', () => {
    // physics.md section 6 (Hashimoto, Howie & Whelan 1962)
    for (const s of [0, 0.01, -0.02]) {
      let dfAsym = 0;
      for (const z of [3, 11.7, 25, 40, 61]) {
        integrateColumn(a, q(s), thick, () => 0, new Float64Array([z, alpha]), 1e-6);
        integrateColumn(b, q(s), thick, () => 0, new Float64Array([thick - z, alpha]), 1e-6);
        expect(Math.abs(intensities(a)[0] - intensities(b)[0])).toBeLessThan(1e-12);
        dfAsym = Math.max(dfAsym, Math.abs(intensities(a)[1] - intensities(b)[1]));
      }
      expect(dfAsym).toBeGreaterThan(0.05);
    }
  });

  it('the outer fringe at the top has the same contrast in BF and DF, at the bottom the opposite', () => {
    // physics.md section 6 (Hashimoto, Howie & Whelan 1962): contrast = sign
    // of the change from the perfect-crystal background
    for (const s of [0, 0.005, -0.005]) {
      for (const sign of [1, -1]) {
        const bg = new Float64Array(4);
        perfectCrystal(bg, q(s), thick);
        const [b0, bg0] = intensities(bg);
        const f = new Float64Array(2);
        f[1] = sign * alpha;
        f[0] = 1; // fault meets the column 1 nm below the top surface
        integrateColumn(a, q(s), thick, () => 0, f, 1e-6);
        expect(Math.sign(intensities(a)[0] - b0)).toBe(Math.sign(intensities(a)[1] - bg0));
        f[0] = thick - 1; // 1 nm above the bottom surface
        integrateColumn(a, q(s), thick, () => 0, f, 1e-6);
        expect(Math.sign(intensities(a)[0] - b0)).toBe(-Math.sign(intensities(a)[1] - bg0));
      }
    }
  });
});
