/**
 * Columns through a coherent spherical inclusion (Ashby & Brown 1963) and
 * columns with a jump of beta'. beta' jumps where a column enters and leaves
 * the sphere. A step-doubling error estimate (4th order) that samples beta'
 * only inside its slices (the previous integrator, Gauss-Legendre nodes,
 * twoBeamColumnGauss.ts) does not see a jump near a slice's end: without
 * breakpoints its inclusion images were off by up to ~3 % of the background
 * at the default tolerance. integrateColumn samples the ends of its slices
 * too, so it sees every jump, but can only meet the tolerance by halving down
 * to its shortest slice there; the renderer therefore makes the entry and
 * exit depths breakpoints (accuracy for the old sampling, cost for the new).
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { render, scenario } from './helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { integrateColumn, type ColumnStats, type TwoBeamParams } from '../../src/dynamics/twoBeam.js';
import { integrateColumnGaussNodes } from '../../src/dynamics/twoBeamColumnGauss.js';

interface InclusionReference {
  a_nm: number;
  poissonRatio: number;
  xi_nm: number;
  xiAbs_nm: number;
  xiAbs0_nm: number;
  thickness_nm: number;
  radius_nm: number;
  centreDepth_nm: number;
  misfit: number;
  width_px: number;
  height_px: number;
  pixel_nm: number;
  background: { bf: number; df: number };
  bf: number[];
  df: number[];
}

const root = fileURLToPath(new URL('../../', import.meta.url));
// written by `/usr/bin/python3 scripts/ref_inclusion_columns.py` (scipy solve_ivp DOP853 split at the sphere surface)
const ref = JSON.parse(readFileSync(`${root}test/reference/inclusion-columns.json`, 'utf8')) as InclusionReference;

function inclusionScenario(beams: unknown) {
  return scenario({
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: ref.thickness_nm, normal: [0, 0, 1] },
    image: { width_px: ref.width_px, height_px: ref.height_px, pixel_nm: ref.pixel_nm },
    absorption: 0.1,
    surfaces: 'infinite', // the scipy reference integrates the infinite-medium field
    conditions: [{ id: 'g200', g: [2, 0, 0], w: 0, beams }],
    defects: [{ type: 'inclusion', centre_nm: [0, 0, ref.centreDepth_nm], radius_nm: ref.radius_nm, misfit: ref.misfit }],
  });
}

describe('inclusion image against an independent scipy integration (scripts/ref_inclusion_columns.py)', () => {
  it('the scenario has the reference inputs (Cu, g 200 at 200 kV, the same xi_g, xi\'_g and Poisson ratio)', () => {
    const sc = inclusionScenario(2);
    const c = resolveCondition(sc, sc.conditions[0]);
    expect(sc.material.lattice.a_nm).toBe(ref.a_nm);
    expect(sc.material.elastic.poissonRatio).toBeCloseTo(ref.poissonRatio, 12);
    expect(c.xi_nm).toBeCloseTo(ref.xi_nm, 9);
    expect(c.xiAbs_nm).toBeCloseTo(ref.xiAbs_nm, 8);
    expect(c.xiAbs0_nm).toBeCloseTo(ref.xiAbs0_nm, 8);
    expect(c.s_per_nm).toBe(0);
  });

  // Two-beam engine at the default tolerance 1e-4, and the many-beam engine with the beam set {000, g} (the same
  // two-beam problem, physics.md section 4). The many-beam stepper's exit error is 1 to 20 times its tolerance
  // (src/dynamics/manyBeam.ts; here 5.5 x: 5.5e-4 at 1e-4, 5.4e-5 at 1e-5, 5.7e-6 at 1e-6), so it runs at 1e-5.
  for (const [name, beams, tol] of [
    ['two-beam engine', 2, 1e-4],
    ['many-beam engine, beam set {000, g}', { set: [[2, 0, 0]] }, 1e-5],
  ] as const) {
    it(`${name}: every pixel within 1e-3 of the background (tolerance ${tol})`, async () => {
      const [ci] = await render(inclusionScenario(beams), tol);
      expect(ci.background.bf).toBeCloseTo(ref.background.bf, 9);
      expect(ci.background.df).toBeCloseTo(ref.background.df, 9);
      let errBF = 0;
      let errDF = 0;
      let contrast = 0;
      for (let k = 0; k < ref.bf.length; k++) {
        errBF = Math.max(errBF, Math.abs(ci.bf[k] - ref.bf[k]));
        errDF = Math.max(errDF, Math.abs(ci.df[k] - ref.df[k]));
        contrast = Math.max(contrast, Math.abs(ref.bf[k] / ref.background.bf - 1));
      }
      expect(contrast).toBeGreaterThan(0.1); // the image has contrast to get wrong
      expect(errBF / ref.background.bf).toBeLessThan(1e-3);
      expect(errDF / ref.background.bf).toBeLessThan(1e-3);
    });
  }
});

// ---- a step of beta' against the closed form (physics.md section 3: product of two exact slab matrices) ----

type C = [number, number];
const cmul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cadd = (a: C, b: C): C => [a[0] + b[0], a[1] + b[1]];
const cdiv = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const cexp = (a: C): C => [Math.exp(a[0]) * Math.cos(a[1]), Math.exp(a[0]) * Math.sin(a[1])];
const csqrt = (a: C): C => {
  const r = Math.hypot(a[0], a[1]);
  const re = Math.sqrt((r + a[0]) / 2);
  const im = Math.sign(a[1] || 1) * Math.sqrt(Math.max(0, (r - a[0]) / 2));
  return [re, im];
};
const ccos = (a: C): C => [Math.cos(a[0]) * Math.cosh(a[1]), -Math.sin(a[0]) * Math.sinh(a[1])];
const csin = (a: C): C => [Math.sin(a[0]) * Math.cosh(a[1]), Math.cos(a[0]) * Math.sinh(a[1])];

/** exp(pi i M D) exp(-pi D / xi'0) applied to (phi0, phig), M = [[0, q], [q, 2 se]] (physics.md section 3). */
function slab(v: [C, C], p: TwoBeamParams, se: number, D: number): [C, C] {
  const q: C = [1 / p.xi_nm, 1 / p.xiAbs_nm];
  const sigma = csqrt(cadd([se * se, 0], cmul(q, q)));
  const arg = cmul([Math.PI * D, 0], sigma);
  const co = ccos(arg);
  const sOverSigma = cmul([0, 1], cdiv(csin(arg), sigma)); // i sin / sigma
  const pre = cexp([-Math.PI * D / p.xiAbs0_nm, Math.PI * se * D]);
  // (M - se I) = [[-se, q], [q, se]]
  const m00 = cadd(co, cmul(sOverSigma, [-se, 0]));
  const m01 = cmul(sOverSigma, q);
  const m11 = cadd(co, cmul(sOverSigma, [se, 0]));
  const a = cadd(cmul(m00, v[0]), cmul(m01, v[1]));
  const b = cadd(cmul(m01, v[0]), cmul(m11, v[1]));
  return [cmul(pre, a), cmul(pre, b)];
}

describe("a step of beta' scanned over 400 depths (closed form: two exact slab matrices, physics.md section 3)", () => {
  // Cu 200-like numbers; the step is the jump at the surface of the audit's inclusion: 3 eps |g| = 3 * 0.0137 * 5.53 nm^-1
  const p: TwoBeamParams = { xi_nm: 42.79, xiAbs_nm: 427.9, xiAbs0_nm: 427.9, s_per_nm: 0.005 };
  const t = 50;
  const b1 = 0.01;
  const b2 = -0.22;
  const depths = Array.from({ length: 400 }, (_, i) => ((i + 0.5) / 400) * t);
  const exact = depths.map((z0) => {
    const v = slab(slab([[1, 0], [0, 0]], p, p.s_per_nm + b1, z0), p, p.s_per_nm + b2, t - z0);
    return [v[0][0] ** 2 + v[0][1] ** 2, v[1][0] ** 2 + v[1][1] ** 2];
  });
  const worst = (withBreakpoint: boolean, integrate = integrateColumn, stats?: ColumnStats) => {
    const out = new Float64Array(4);
    let m = 0;
    depths.forEach((z0, i) => {
      const step = (z: number) => (z < z0 ? b1 : b2);
      // the renderer's breakpoint: a zero phase step at the depth of the jump
      integrate(out, p, t, step, withBreakpoint ? Float64Array.of(z0, 0) : new Float64Array(0), 1e-4, stats);
      m = Math.max(m, Math.abs(out[0] ** 2 + out[1] ** 2 - exact[i][0]), Math.abs(out[2] ** 2 + out[3] ** 2 - exact[i][1]));
    });
    return m;
  };

  it('with the jump as a breakpoint no column is off by more than 1e-4 (tol 1e-4)', () => {
    expect(worst(true)).toBeLessThan(1e-4);
  });

  it('without the breakpoint the error of Gauss-Legendre sampling does not follow the tolerance (why the renderer added breakpoints)', () => {
    expect(worst(false, integrateColumnGaussNodes)).toBeGreaterThan(1e-4);
  });

  it('without the breakpoint integrateColumn stays within 1e-4 but refines to its shortest slice at the jump (why the renderer keeps them)', () => {
    const withBp: ColumnStats = { slices: 0 };
    const without: ColumnStats = { slices: 0 };
    expect(worst(true, integrateColumn, withBp)).toBeLessThan(1e-4);
    expect(worst(false, integrateColumn, without)).toBeLessThan(1e-4);
    // a jump inside a slice is a first-order error: the error estimate stays above the tolerance down to MIN_SLICE_NM
    expect(without.forced ?? 0).toBeGreaterThanOrEqual(depths.length);
    expect(without.betaCalls ?? 0).toBeGreaterThan(4 * (withBp.betaCalls ?? 0));
  });
});
