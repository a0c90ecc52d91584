import { describe, expect, it } from 'vitest';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import {
  integrateColumn,
  MAX_SLICES,
  type ColumnStats,
  type TwoBeamParams,
} from '../../src/dynamics/twoBeam.js';
import { rk4Column } from '../../src/dynamics/rk4Reference.js';
import { InternalError } from '../../src/errors.js';
import {
  intensities,
  loadScipyFixture,
  lorentzBeta,
  maxAbsDiff,
  paramsOf,
  type ScipyCase,
} from './twoBeamReference.js';
import { needPython, runPython } from '../python.js';

const SCRIPT = fileURLToPath(new URL('../../scripts/twobeam_reference.py', import.meta.url));
const scipy = needPython('numpy', 'scipy');

const none = new Float64Array(0);
const out = new Float64Array(4);
const fixture = loadScipyFixture();
const strained = fixture.filter((c) => c.lorentz && c.lorentz.length > 0 && !c.name.startsWith('random'));
const random = fixture.filter((c) => c.name.startsWith('random'));

const intensityError = (a: ArrayLike<number>, ref: ArrayLike<number>): number => {
  const [i0, ig] = intensities(a);
  const [r0, rg] = intensities(ref);
  return Math.max(Math.abs(i0 - r0), Math.abs(ig - rg));
};

/** beta' of a straight dislocation passing the column at distance x0 at depth z0. */
const dislocation = (gb: number, x0: number, z0: number) => (z: number): number =>
  (gb / (2 * Math.PI)) * (x0 / (x0 * x0 + (z - z0) * (z - z0)));

describe('strained columns against scipy (test/reference/twobeam-scipy.json, scripts/twobeam_reference.py)', () => {
  it('Lorentzian beta\' (dislocation-like strain): amplitudes within 1e-6 of DOP853 at tol 1e-7', () => {
    expect(strained.length).toBeGreaterThanOrEqual(9);
    for (const c of strained) {
      integrateColumn(out, paramsOf(c), c.t_nm, lorentzBeta(c.lorentz!), none, 1e-7);
      // reference: scipy.integrate.solve_ivp DOP853 rtol = atol = 1e-12
      expect(maxAbsDiff(out, c.amplitudes!), c.name).toBeLessThan(1e-6);
    }
  });

  it('meets its intensity tolerance on 60 random columns (1-3 peaks, widths 0.02-20 nm)', () => {
    expect(random.length).toBe(60);
    for (const tol of [1e-3, 1e-4, 1e-5, 1e-6]) {
      let worst = 0;
      for (const c of random) {
        integrateColumn(out, paramsOf(c), c.t_nm, lorentzBeta(c.lorentz!), none, tol);
        // reference: scipy DOP853 (fixture); claim: |dI| <= tol
        worst = Math.max(worst, intensityError(out, c.amplitudes!) / tol);
      }
      expect(worst, `tol ${tol}`).toBeLessThan(1);
    }
  });

  it('agrees with scipy run now on a few cases (checks that the fixture is current)', (ctx) => {
    scipy.require(ctx);
    const pick: ScipyCase[] = [strained[0], strained[3], random[7]];
    const input = pick.map((c) => ({ ...c, amplitudes: undefined }));
    const live = JSON.parse(runPython([SCRIPT, '--stdin'], input).stdout) as number[][];
    pick.forEach((c, k) => {
      // same script, same solver: the committed fixture must reproduce
      expect(maxAbsDiff(live[k], c.amplitudes!)).toBeLessThan(1e-9);
      integrateColumn(out, paramsOf(c), c.t_nm, lorentzBeta(c.lorentz!), none, 1e-8);
      expect(maxAbsDiff(out, live[k])).toBeLessThan(1e-6);
    });
  });
});

describe('independent cross-checks', () => {
  const p: TwoBeamParams = { xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: 0.005 };
  const bp = dislocation(1, 2, 43);

  it('RK4 converges with order 4 to the same column (rk4Reference.ts)', () => {
    const ref = new Float64Array(4);
    integrateColumn(ref, p, 100, bp, none, 1e-10);
    const e: number[] = [];
    for (const n of [400, 800, 1600]) {
      rk4Column(out, p, 100, bp, n);
      e.push(maxAbsDiff(out, ref));
    }
    // classical RK4 has global order 4 (Hairer, Norsett & Wanner, Solving ODEs I, II.1):
    // halving h divides the error by about 16
    expect(e[0] / e[1]).toBeGreaterThan(12);
    expect(e[1] / e[2]).toBeGreaterThan(12);
    expect(e[2]).toBeLessThan(1e-8);
  });

  it('matches npm odex (Hairer\'s GBS extrapolation code) to 1e-7', () => {
    const require = createRequire(import.meta.url);
    const odex = require('odex') as {
      Solver: new (n: number) => {
        absoluteTolerance: number;
        relativeTolerance: number;
        maxSteps: number;
        solve: (f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number) => { y: number[]; outcome: number };
      };
    };
    const cases: [TwoBeamParams, (z: number) => number, number][] = [
      [p, bp, 100],
      [{ xi_nm: 55, xiAbs_nm: Infinity, xiAbs0_nm: Infinity, s_per_nm: -0.01 }, dislocation(-2, 4, 70), 140],
    ];
    for (const [q, f, t] of cases) {
      const solver = new odex.Solver(4);
      solver.absoluteTolerance = 1e-12;
      solver.relativeTolerance = 1e-12;
      solver.maxSteps = 100000;
      const pi = Math.PI;
      const cr = -pi / q.xiAbs_nm; // pi i q = cr + i ci
      const ci = pi / q.xi_nm;
      const d = -pi / q.xiAbs0_nm;
      const rhs = (z: number, y: number[]): number[] => {
        const w = 2 * pi * (q.s_per_nm + f(z));
        return [
          d * y[0] + cr * y[2] - ci * y[3],
          d * y[1] + cr * y[3] + ci * y[2],
          cr * y[0] - ci * y[1] + d * y[2] - w * y[3],
          cr * y[1] + ci * y[0] + d * y[3] + w * y[2],
        ];
      };
      const r = solver.solve(rhs, 0, [1, 0, 0, 0], t);
      expect(r.outcome).toBe(0);
      integrateColumn(out, q, t, f, none, 1e-9);
      expect(maxAbsDiff(out, r.y)).toBeLessThan(1e-7);
    }
  });
});

describe('error control', () => {
  const p: TwoBeamParams = { xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: 0 };
  const bp = dislocation(1, 2, 50);

  it('halving tol changes the intensities by less than the tolerance claims', () => {
    const a = new Float64Array(4);
    for (const tol of [1e-3, 1e-4, 1e-5, 1e-6]) {
      integrateColumn(a, p, 100, bp, none, tol);
      integrateColumn(out, p, 100, bp, none, tol / 2);
      expect(intensityError(a, out), `tol ${tol}`).toBeLessThan(tol);
    }
  });

  it('uses more slices for a tighter tolerance, about tol^(-1/4) for a 4th-order method', () => {
    const n: number[] = [];
    for (const tol of [1e-4, 1e-8]) {
      const st: ColumnStats = { slices: 0 };
      integrateColumn(out, p, 100, bp, none, tol, st);
      n.push(st.slices);
    }
    // 10^4 in tol -> 10x in slices for order 4; allow 4x..25x
    expect(n[1] / n[0]).toBeGreaterThan(4);
    expect(n[1] / n[0]).toBeLessThan(25);
  });

  it('without absorption conserves I_0 + I_g = 1 in a strained column (every slice is unitary)', () => {
    const q: TwoBeamParams = { xi_nm: 30, xiAbs_nm: Infinity, xiAbs0_nm: Infinity, s_per_nm: 0.01 };
    for (const tol of [1e-2, 1e-4]) {
      integrateColumn(out, q, 100, dislocation(2, 0.7, 31), none, tol);
      const [i0, ig] = intensities(out);
      // Howie-Whelan equations without absorption conserve |phi0|^2 + |phig|^2 (Hirsch et al. 1965)
      expect(Math.abs(i0 + ig - 1)).toBeLessThan(1e-12);
    }
  });

  it('a near-singular spike (rho = 0.01 nm) gives finite, accurate values with a bounded slice count', () => {
    const f = dislocation(1, 0.01, 41.3);
    const st: ColumnStats = { slices: 0 };
    integrateColumn(out, p, 100, f, none, 1e-4, st);
    expect(Number.isFinite(out[0] + out[1] + out[2] + out[3])).toBe(true);
    // bounded work (the time of this column is in bench/guards.mjs, not here)
    expect(st.slices).toBeLessThan(1000);
    // reference: RK4 with h = 1/200 of the peak width (2e5 steps)
    const ref = new Float64Array(4);
    rk4Column(ref, p, 100, f, 2e5);
    expect(intensityError(out, ref)).toBeLessThan(1e-4);
  });

  it('a column through the core (rho = 1e-7 nm) still ends with finite values', () => {
    // Such a peak is far narrower than MIN_SLICE_NM and than the spacing of the
    // samples: the integrator cannot resolve it (documented limit); it must
    // still return finite amplitudes after a bounded amount of work.
    const st: ColumnStats = { slices: 0 };
    integrateColumn(out, p, 100, dislocation(1, 1e-7, 50), none, 1e-4, st);
    expect(Number.isFinite(out[0] + out[1] + out[2] + out[3])).toBe(true);
    expect(st.slices).toBeLessThanOrEqual(MAX_SLICES + 1);
  });

  it('an unresolvable beta\' (oscillating faster than MIN_SLICE_NM) hits the guards and ends', () => {
    const st: ColumnStats = { slices: 0 };
    integrateColumn(out, p, 100, (z) => 50 * Math.sin((2 * Math.PI * z) / 3e-4), none, 1e-4, st);
    expect(Number.isFinite(out[0] + out[1] + out[2] + out[3])).toBe(true);
    // bounded work (its time is in bench/guards.mjs, not here)
    expect(st.slices).toBeLessThanOrEqual(MAX_SLICES + 1);
    expect(st.forced ?? 0).toBeGreaterThan(0);
  });

  it('adds to the caller\'s counters', () => {
    const st: ColumnStats = { slices: 0 };
    integrateColumn(out, p, 100, bp, none, 1e-4, st);
    const once = st.slices;
    integrateColumn(out, p, 100, bp, none, 1e-4, st);
    expect(st.slices).toBe(2 * once);
    expect(st.betaCalls).toBeGreaterThan(st.slices);
  });
});

describe('bad input', () => {
  const p: TwoBeamParams = { xi_nm: 30, xiAbs_nm: 300, xiAbs0_nm: 300, s_per_nm: 0 };
  it('throws instead of returning NaN', () => {
    expect(() => integrateColumn(out, p, 100, () => NaN, none, 1e-4)).toThrow(/not finite/);
    expect(() => integrateColumn(out, p, 100, (z) => (z > 60 ? Infinity : 0), none, 1e-4)).toThrow(/not finite/);
    expect(() => integrateColumn(out, p, 100, () => 0, none, 0)).toThrow(/tol/);
    expect(() => integrateColumn(out, p, 100, () => 0, new Float64Array([50]), 1e-4)).toThrow(/pairs/);
    expect(() => integrateColumn(out, p, 100, () => 0, new Float64Array([50, 1, 20, 1]), 1e-4)).toThrow(/sorted/);
    expect(() => integrateColumn(out, { ...p, xi_nm: -1 }, 100, () => 0, none, 1e-4)).toThrow(InternalError);
    expect(() => rk4Column(out, p, 100, () => 0, 0)).toThrow(/nSteps/);
  });

  it('names beta\' also when it is not finite only at the start of the column (the first sample of a stretch)', () => {
    expect(() => integrateColumn(out, p, 100, (z) => (z < 1e-6 ? NaN : 0.01), none, 1e-4)).toThrow(/beta'\(z\) is not finite near z = 0 nm/);
  });
});
