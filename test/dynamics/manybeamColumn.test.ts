/**
 * Many-beam column integrator (src/dynamics/manyBeam.ts) against:
 *  - scipy.integrate.solve_ivp (DOP853, rtol 1e-12) and scipy.linalg.expm,
 *    fixture written by scripts/ref_manybeam_columns.py;
 *  - npm's odex (Hairer & Wanner's Gragg-Bulirsch-Stoer code) on the two-beam
 *    Howie-Whelan equations as written in physics.md section 3;
 *  - the two-beam engine (src/dynamics/twoBeam.ts), including its fault sign;
 *  - unitarity without absorption (physics.md section 4).
 * All crystal numbers are invented test inputs (realistic magnitudes).
 */
import { describe, expect, it } from 'vitest';
import { createRequire } from 'node:module';
import { amplitudesAt, blochWaves } from '../../src/dynamics/blochWaves.js';
import {
  integrateColumnN,
  integrateColumnNVector,
  lastIntegrationStats,
  prepareColumnSystem,
  prepareColumnSystemVector,
} from '../../src/dynamics/manyBeam.js';
import type { ManyBeamInput } from '../../src/dynamics/manyBeamStructureMatrix.js';
import { systematicRowInput, systematicRowOrders, weakBeamDeviation } from '../../src/dynamics/manyBeamSystematicRow.js';
import { integrateColumn as integrateTwoBeamColumn } from '../../src/dynamics/twoBeam.js';
import { InternalError } from '../../src/errors.js';
import {
  G_200_PER_NM,
  LAMBDA_200KV_NM,
  inventedAbsorption,
  inventedPotential,
  maxAbsDiff,
  readFixture,
  toInput,
  totalIntensity,
  type FixtureInputs,
} from './manybeamFixtures.js';

const K = 1 / LAMBDA_200KV_NM;

/** npm odex, loaded through require: its shipped odex.ts does not pass this repo's strict type-check */
interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  maxSteps: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number): { y: number[]; outcome: number };
}
const odex = createRequire(import.meta.url)('odex') as { Solver: new (n: number) => OdexSolver };

/** beta' of a screw dislocation parallel to the surfaces at depth zc, column at distance x: (g.b/2pi) x/(x^2+(z-zc)^2) */
function screwLike(gb: number, x: number, zc: number): (z: number) => number {
  return (z: number) => (gb / (2 * Math.PI)) * (x / (x * x + (z - zc) * (z - zc)));
}

function twoBeamInput(xi: number, xiAbs: number, xiAbs0: number, s: number): ManyBeamInput {
  const u = K / xi;
  const up = K / xiAbs;
  const up0 = K / xiAbs0;
  return {
    excitationErrors_per_nm: Float64Array.from([0, s]),
    potentialRe_per_nm2: Float64Array.from([0, u, u, 0]),
    potentialIm_per_nm2: new Float64Array(4),
    absorptionRe_per_nm2: Float64Array.from([up0, up, up, up0]),
    absorptionIm_per_nm2: new Float64Array(4),
    waveNumber_per_nm: K,
  };
}

function weakBeamRow(): ManyBeamInput {
  return systematicRowInput({
    nMin: -1,
    nMax: 3,
    s_g: weakBeamDeviation(3, LAMBDA_200KV_NM, G_200_PER_NM),
    lambda_nm: LAMBDA_200KV_NM,
    g_per_nm: G_200_PER_NM,
    potential: inventedPotential(),
    absorption: inventedAbsorption(),
  });
}

describe('integrateColumnN vs scipy (fixture from scripts/ref_manybeam_columns.py)', () => {
  interface Column {
    t_nm: number;
    strain: { kind: string; gb?: number; x_nm?: number; zc_nm?: number; b_nm?: number[] };
    faults: number[][];
    phi: number[];
  }
  interface Case {
    name: string;
    kind: 'row' | 'general';
    orders?: number[];
    beamVectors_per_nm?: number[];
    incident: number;
    inputs: FixtureInputs;
    columns: Column[];
  }
  const fixture = readFixture<{ cases: Case[] }>('manybeam-columns.json');
  for (const c of fixture.cases) {
    for (const col of c.columns) {
      const label = `${c.name}, strain ${col.strain.kind} x=${col.strain.x_nm ?? '-'} nm, ${col.faults.length} faults`;
      it(`${label}: agrees to 1e-9 at tol 1e-10 and to 5e-5 at tol 1e-6`, () => {
        const input = toInput(c.inputs);
        const n = input.excitationErrors_per_nm.length;
        const out = new Float64Array(2 * n);
        const faults = Float64Array.from(col.faults.flat());
        const st = col.strain;
        for (const [tol, bound] of [
          [1e-10, 1e-9],
          [1e-6, 5e-5],
        ]) {
          if (c.kind === 'row') {
            const sys = prepareColumnSystem(input, Float64Array.from(c.orders!), { incident: c.incident });
            const bp = st.kind === 'none' ? () => 0 : screwLike(st.gb!, st.x_nm!, st.zc_nm!);
            integrateColumnN(out, sys, col.t_nm, bp, tol, faults);
          } else {
            const sys = prepareColumnSystemVector(input, Float64Array.from(c.beamVectors_per_nm!), { incident: c.incident });
            const b = st.b_nm!;
            const x = st.x_nm!;
            const zc = st.zc_nm!;
            integrateColumnNVector(
              out,
              sys,
              col.t_nm,
              (z, o) => {
                const l = x / (2 * Math.PI * (x * x + (z - zc) ** 2));
                o[0] = b[0] * l;
                o[1] = b[1] * l;
                o[2] = b[2] * l;
              },
              tol,
              faults,
            );
          }
          // scipy.integrate.solve_ivp DOP853 rtol 1e-12 on dphi/dz = 2 pi i (A0 + D(z)) phi
          expect(maxAbsDiff(out, col.phi)).toBeLessThan(bound);
        }
      });
    }
  }
});

describe('two beams reproduce the two-beam integration (physics.md section 3)', () => {
  const p = { xi_nm: 45, xiAbs_nm: 450, xiAbs0_nm: 450, s_per_nm: 0.008 };
  const input = twoBeamInput(p.xi_nm, p.xiAbs_nm, p.xiAbs0_nm, p.s_per_nm);
  const orders = Float64Array.from([0, 1]);

  /** two-beam Howie-Whelan equations of physics.md section 3, integrated by odex (GBS extrapolation) */
  function odexTwoBeam(t: number, betaPrime: (z: number) => number, faults: number[][] = []): number[] {
    const qr = 1 / p.xi_nm;
    const qi = 1 / p.xiAbs_nm;
    const a0 = Math.PI / p.xiAbs0_nm;
    // y = [re phi0, im phi0, re phig, im phig]; pi i q phi = pi (i qr - qi) phi
    const f = (z: number, y: number[]): number[] => {
      const [p0r, p0i, pgr, pgi] = y;
      const se = 2 * Math.PI * (p.s_per_nm + betaPrime(z));
      // pi i q phig
      const cgr = Math.PI * (-qr * pgi - qi * pgr);
      const cgi = Math.PI * (qr * pgr - qi * pgi);
      const c0r = Math.PI * (-qr * p0i - qi * p0r);
      const c0i = Math.PI * (qr * p0r - qi * p0i);
      return [-a0 * p0r + cgr, -a0 * p0i + cgi, c0r - a0 * pgr - se * pgi, c0i - a0 * pgi + se * pgr];
    };
    const solver = new odex.Solver(4);
    solver.absoluteTolerance = 1e-13;
    solver.relativeTolerance = 1e-13;
    solver.maxSteps = 100000;
    let y = [1, 0, 0, 0];
    let z0 = 0;
    for (const [zf, alpha] of [...faults, [t, 0]]) {
      if (zf > z0) {
        const r = solver.solve(f, z0, y, zf);
        expect(r.outcome).toBe(0); // odex Outcome.Converged
        y = r.y;
        z0 = zf;
      }
      // fault in the beta form: phig -> e^{+i alpha} phig (twoBeam.ts convention)
      const c = Math.cos(alpha);
      const s = Math.sin(alpha);
      y = [y[0], y[1], c * y[2] - s * y[3], c * y[3] + s * y[2]];
    }
    return y;
  }

  it('perfect crystal with absorption: integrator = Bloch-wave solution = twoBeam engine to 1e-12', () => {
    const sys = prepareColumnSystem(input, orders, { incident: 0 });
    const a = new Float64Array(4);
    const b = new Float64Array(4);
    const c = new Float64Array(4);
    const waves = blochWaves(input, 0);
    for (const t of [17, 100, 260]) {
      integrateColumnN(a, sys, t, () => 0, 1e-6);
      amplitudesAt(b, waves, t);
      integrateTwoBeamColumn(c, p, t, () => 0, new Float64Array(0), 1e-10);
      expect(maxAbsDiff(a, b)).toBeLessThan(1e-12); // beta' = 0: the interaction picture is exact
      expect(maxAbsDiff(a, c)).toBeLessThan(1e-12); // two-beam engine, exact slab matrix
    }
  });

  for (const x of [0.3, 2, 10]) {
    it(`dislocation-like beta' (screw, x = ${x} nm): agrees with odex and with the two-beam engine to 1e-8`, () => {
      const t = 120;
      const bp = screwLike(2, x, 55);
      const sys = prepareColumnSystem(input, orders, { incident: 0 });
      const a = new Float64Array(4);
      integrateColumnN(a, sys, t, bp, 1e-11);
      const ref = odexTwoBeam(t, bp);
      expect(maxAbsDiff(a, ref)).toBeLessThan(1e-8); // odex on the equations of physics.md section 3
      const c = new Float64Array(4);
      // tol 1e-10 for the two-beam engine: at 1e-11 and x = 0.3 nm it reaches its MAX_SLICES guard
      integrateTwoBeamColumn(c, p, t, bp, new Float64Array(0), 1e-10);
      expect(maxAbsDiff(a, c)).toBeLessThan(1e-8); // src/dynamics/twoBeam.ts
    });
  }

  it('a stacking fault [z, alpha] gives the same amplitudes as the two-beam engine and odex (same sign convention)', () => {
    const t = 110;
    const faults = [
      [37.5, (2 * Math.PI) / 3],
      [80, -(2 * Math.PI) / 3],
    ];
    const bp = screwLike(1, 4, 60);
    const sys = prepareColumnSystem(input, orders, { incident: 0 });
    const a = new Float64Array(4);
    integrateColumnN(a, sys, t, bp, 1e-11, Float64Array.from(faults.flat()));
    const c = new Float64Array(4);
    integrateTwoBeamColumn(c, p, t, bp, Float64Array.from(faults.flat()), 1e-10);
    expect(maxAbsDiff(a, c)).toBeLessThan(1e-8); // src/dynamics/twoBeam.ts fault matrix diag(1, e^{+i alpha})
    expect(maxAbsDiff(a, odexTwoBeam(t, bp, faults))).toBeLessThan(1e-8); // odex, same convention
    // the opposite sign is a different image (the test can tell the two conventions apart)
    const flipped = Float64Array.from(faults.flatMap(([z, al]) => [z, -al]));
    integrateColumnN(a, sys, t, bp, 1e-11, flipped);
    expect(Math.abs(Math.hypot(a[2], a[3]) - Math.hypot(c[2], c[3]))).toBeGreaterThan(1e-3);
  });
});

describe('fault sign: a phase jump equals a step of g.R in the beta\' form (derivation in src/dynamics/twoBeamColumn.ts)', () => {
  it('5 beams: fault alpha at z0 = steep smooth ramp of g.R by alpha/(2 pi) at z0', () => {
    const input = weakBeamRow();
    const orders = systematicRowOrders(-1, 3);
    const sys = prepareColumnSystem(input, orders, { incident: 1 });
    const t = 90;
    const z0 = 41.3;
    const alpha = (2 * Math.PI) / 3;
    const withFault = new Float64Array(10);
    integrateColumnN(withFault, sys, t, () => 0, 1e-11, Float64Array.from([z0, alpha]));
    // g.R = (alpha/2pi) (1 + tanh((z - z0)/width))/2, so beta' = (alpha/2pi) sech^2((z - z0)/width) / (2 width)
    const diffs: number[] = [];
    const withRamp = new Float64Array(10);
    for (const width of [0.02, 0.005]) {
      const ramp = (z: number): number => (alpha / (2 * Math.PI)) * (0.5 / width) / Math.cosh((z - z0) / width) ** 2;
      // a breakpoint at the ramp: the stepper restarts there with a step scaled to beta'
      integrateColumnN(withRamp, sys, t, ramp, 1e-11, Float64Array.from([z0, 0]));
      diffs.push(maxAbsDiff(withRamp, withFault));
    }
    // the ramp converges to the fault as the width shrinks (error at least first order in the width)
    expect(diffs[1]).toBeLessThan(diffs[0] / 3);
    expect(diffs[1]).toBeLessThan(5e-4);
    const opposite = new Float64Array(10);
    integrateColumnN(opposite, sys, t, () => 0, 1e-11, Float64Array.from([z0, -alpha]));
    expect(maxAbsDiff(withRamp, opposite)).toBeGreaterThan(0.05);
  });
});

describe('unitarity and consistency', () => {
  it('without absorption sum |phi_g|^2 = 1 with a dislocation-like beta\', N = 3, 5, 7, 11 (physics.md section 4)', () => {
    for (const half of [1, 2, 3, 5]) {
      const input = systematicRowInput({
        nMin: -half,
        nMax: half,
        s_g: 0.013,
        lambda_nm: LAMBDA_200KV_NM,
        g_per_nm: G_200_PER_NM,
        potential: inventedPotential(0.4),
        absorption: () => [0, 0],
      });
      const sys = prepareColumnSystem(input, systematicRowOrders(-half, half), { incident: half });
      const out = new Float64Array(2 * (2 * half + 1));
      integrateColumnN(out, sys, 100, screwLike(2, 1.5, 50), 1e-12);
      // the integrator is not exactly unitary: the error is of the order of the global error (~ tol)
      expect(Math.abs(totalIntensity(out) - 1)).toBeLessThan(1e-10);
      integrateColumnN(out, sys, 100, () => 0, 1e-6);
      expect(Math.abs(totalIntensity(out) - 1)).toBeLessThan(1e-12);
    }
  });

  it('a systematic row written as a general beam set gives the same amplitudes (consistency of the two entry points)', () => {
    const input = weakBeamRow();
    const orders = systematicRowOrders(-1, 3);
    const ghat = [0.6, 0.8, 0]; // unit vector along g
    const gv = new Float64Array(15);
    for (let j = 0; j < 5; j++) for (let k = 0; k < 3; k++) gv[3 * j + k] = orders[j] * G_200_PER_NM * ghat[k];
    const bp = screwLike(2, 1.2, 33);
    const a = new Float64Array(10);
    const b = new Float64Array(10);
    integrateColumnN(a, prepareColumnSystem(input, orders, { incident: 1 }), 80, bp, 1e-10, Float64Array.from([20, 1.1]));
    // dR/dz along g with g.dR/dz = beta'; fault Delta R with 2 pi g.Delta R = alpha
    const sysV = prepareColumnSystemVector(input, gv, { incident: 1 });
    const dR = 1.1 / (2 * Math.PI * G_200_PER_NM);
    integrateColumnNVector(
      b,
      sysV,
      80,
      (z, o) => {
        const v = bp(z) / G_200_PER_NM;
        o[0] = v * ghat[0];
        o[1] = v * ghat[1];
        o[2] = v * ghat[2];
      },
      1e-10,
      Float64Array.from([20, dR * ghat[0], dR * ghat[1], dR * ghat[2]]),
    );
    expect(maxAbsDiff(a, b)).toBeLessThan(1e-9);
  });

  it('reports step statistics, and a perfect crystal costs only maxStep-sized steps', () => {
    const sys = prepareColumnSystem(weakBeamRow(), systematicRowOrders(-1, 3), { incident: 1, maxStep_nm: 10 });
    const out = new Float64Array(10);
    const steps = integrateColumnN(out, sys, 100, () => 0);
    expect(steps).toBe(10);
    expect(lastIntegrationStats(sys).rejected).toBe(0);
  });

  it('bad arguments (a caller bug) throw InternalError naming the field', () => {
    const sys = prepareColumnSystem(weakBeamRow(), systematicRowOrders(-1, 3), { incident: 1 });
    const out = new Float64Array(10);
    expect(() => integrateColumnN(out, sys, -5, () => 0)).toThrow(/thickness_nm/);
    expect(() => integrateColumnN(out, sys, 50, () => 0, 1e-6, Float64Array.from([60, 1]))).toThrow(InternalError);
    expect(() => integrateColumnN(out, sys, 50, () => 0, 1e-6, Float64Array.from([30, 1, 20, 1]))).toThrow(/sorted/);
    expect(() => integrateColumnN(out, sys, 50, () => Number.NaN)).toThrow(InternalError);
    expect(() => integrateColumnNVector(out, sys, 50, () => undefined)).toThrow(InternalError);
    expect(() => prepareColumnSystem(weakBeamRow(), systematicRowOrders(-1, 1), { incident: 1 })).toThrow(/orders/);
    expect(() => prepareColumnSystem(weakBeamRow(), systematicRowOrders(-1, 3), { incident: 1, maxStep_nm: 0 })).toThrow(/maxStep_nm/);
  });
});
