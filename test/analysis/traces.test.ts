/** Trace analysis: the line direction from its projected directions in several beam directions. */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { Vec3 } from '../../src/math/vec3.js';
import { cross, dot, norm, unit } from '../../src/math/vec3.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { directionToCartesian, planeNormalToCartesian } from '../../src/crystal/lattice.js';
import { imageFrame } from '../../src/geometry/frames.js';
import { screenAngle_deg } from '../../src/geometry/conditionGeometry.js';
import { fitLineDirection, planesContaining, startingLine, symmetricEigen3, type TraceView } from '../../src/analysis/traces.js';
import { glidePlane, slipFamilyOf } from '../../src/analysis/traceGlide.js';
import { lengthCheck } from '../../src/analysis/traceLength.js';
import { InputError } from '../../src/errors.js';
import { needPython, runPython } from '../python.js';

const Cu = getMaterial('Cu');
const Fe = getMaterial('alpha-Fe');
const l = Cu.lattice;
const DEG = Math.PI / 180;
const angleDeg = (a: Vec3, b: Vec3) => Math.acos(Math.min(1, Math.abs(dot(unit(a), unit(b))))) / DEG;

/** Seeded normal deviates (mulberry32 + Box-Muller). */
function rng(seed: number) {
  let a = seed >>> 0;
  const uni = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return { uni, normal: () => Math.sqrt(-2 * Math.log(uni() + 1e-300)) * Math.cos(2 * Math.PI * uni()) };
}

/**
 * The forward model through the project's image frame (src/geometry/frames.ts, screen angles of
 * conditionGeometry.ts): a micrograph in beam direction `beam` with an arbitrary imageX; the screen
 * angles of g and of the line u are read off that frame, as a user reads them off the micrograph.
 */
function synthView(beam: Vec3, g: Vec3, u_lattice: Vec3, imageX: Vec3, name: string, err = 1): TraceView {
  const f = imageFrame(directionToCartesian(l, beam), directionToCartesian(l, imageX), directionToCartesian(l, beam), 100);
  return {
    beam,
    g,
    gAngle_deg: screenAngle_deg(f, planeNormalToCartesian(l, g)),
    lineAngle_deg: screenAngle_deg(f, directionToCartesian(l, u_lattice)),
    angleError_deg: err,
    name,
  };
}

describe('trace analysis, worked example by hand (the construction of Edington 1975 and Williams & Carter 2009, numbers ours)', () => {
  // Hand calculation (the textbook's own numbers are not recalled, so the example is ours, worked by hand):
  // view 1: beam [001], g = 200 drawn along +x, trace at 45 degrees counter-clockwise (+y down):
  //   screen direction (cos 45, -sin 45) on ex = [100], ey = ez x ex = [010] -> trace along [1 -1 0];
  //   the plane through the beam and the trace has normal [001] x [1 -1 0] = [1 1 0].
  // view 2: beam [011], g = 200 along +x: ex = [100], ey = [011] x [100] / sqrt 2 = [0 1 -1] / sqrt 2.
  //   A line [1 -1 2] shows there at atan2(-(u.ey), u.ex) = atan2(3/sqrt 2, 1) = 64.7606 degrees.
  //   Its plane normal [011] x p; with view 1, u = [1 1 0] x n2 is parallel to [1 -1 2].
  const views: TraceView[] = [
    { beam: [0, 0, 1], g: [2, 0, 0], gAngle_deg: 0, lineAngle_deg: 45, angleError_deg: 1, name: 'view 1' },
    { beam: [0, 1, 1], g: [2, 0, 0], gAngle_deg: 0, lineAngle_deg: (Math.atan2(3 / Math.SQRT2, 1) * 180) / Math.PI, angleError_deg: 1, name: 'view 2' },
  ];
  const fit = fitLineDirection(l, views);

  it('gives u = [1 -1 2] (to 1e-9 degrees) and names it as the nearest low-index direction', () => {
    expect(angleDeg(fit.u_cart, directionToCartesian(l, [1, -1, 2]))).toBeLessThan(1e-9);
    expect(fit.nearest.text).toBe('[1 -1 2]');
    expect(fit.nearest.angle_deg).toBeLessThan(1e-6);
    // sense follows view 1's trace: u . [1 -1 0] > 0
    expect(dot(fit.u_cart, [1, -1, 0])).toBeGreaterThan(0);
    expect(fit.u.map((x) => Math.round(x * 1e9) / 1e9)).toEqual([0.5, -0.5, 1]);
    expect(fit.dof).toBe(0);
    expect(fit.chi2).toBeLessThan(1e-20);
    // the angles between u and the beams are entries of the cubic angle tables (<112>-<001> 35.26 degrees,
    // <112>-<110> 73.22 degrees; tables of angles between cubic directions in Edington 1975 and Williams &
    // Carter 2009, recalled from memory to 0.01 degree, exact as acos(2/sqrt 6) and acos(1/sqrt 12))
    expect(fit.views[0].angleToBeam_deg).toBeCloseTo(35.26, 2);
    expect(fit.views[1].angleToBeam_deg).toBeCloseTo(73.22, 2);
  });

  it('lists (1 1 0) and (1 -1 -1) among the planes containing [1 -1 2] (u.n = 0 by hand), and no plane with u.n != 0', () => {
    const planes = planesContaining(l, fit.u_cart, 0.01, 3);
    const txt = planes.map((p) => p.hkl.join(' '));
    expect(txt).toContain('1 1 0');
    expect(txt).toContain('1 -1 -1');
    expect(txt).not.toContain('1 1 1'); // [1 -1 2] . (1 1 1) = 2
    for (const p of planes) expect(Math.abs(dot(p.hkl, [1, -1, 2]))).toBe(0); // cubic: u.n = h u + k v + l w
  });

  it('glide plane of b = 1/2[1 1 0], by hand: [1 -1 2] x [1 1 0] = [-2 2 2] -> (-1 1 1), a {111} plane of fcc', () => {
    const gp = glidePlane(Cu, fit, [0.5, 0.5, 0]);
    expect(gp.screw).toBe(false);
    expect(angleDeg(planeNormalToCartesian(l, gp.normal!), planeNormalToCartesian(l, [-1, 1, 1]))).toBeLessThan(1e-6);
    expect(gp.matches).toBe(true);
    expect(gp.slipFamily).toBe('{111}');
    // b = 1/2[1 -1 0]: [1 -1 2] x [1 -1 0] = [2 2 0] -> (1 1 0), not a slip plane of fcc
    const gp2 = glidePlane(Cu, fit, [0.5, -0.5, 0]);
    expect(gp2.nearest!.hkl).toEqual([1, 1, 0]);
    expect(gp2.slipFamily).toBeNull();
  });

  it('slip families: fcc {111}; bcc {110}, {112}, {123}; hcp (0001), {10-10}, {10-11}, {11-22} (Hull & Bacon 2011, table 3.1)', () => {
    expect(slipFamilyOf(Cu, [1, -1, 1])).toBe('{111}');
    expect(slipFamilyOf(Cu, [1, 1, 0])).toBeNull();
    expect(slipFamilyOf(Fe, [0, 1, -1])).toBe('{110}');
    expect(slipFamilyOf(Fe, [1, -1, 2])).toBe('{112}');
    expect(slipFamilyOf(Fe, [3, -2, 1])).toBe('{123}');
    expect(slipFamilyOf(Fe, [1, 1, 1])).toBeNull();
    // hcp: basal, prismatic, pyramidal (Hull & Bacon 2011, table 3.1); (h k l) = (h k i l) without i
    const Ti = getMaterial('Ti');
    expect(slipFamilyOf(Ti, [0, 0, 1])).toBe('{0001}');
    expect(slipFamilyOf(Ti, [1, 0, 0])).toBe('{10-10}');
    expect(slipFamilyOf(Ti, [0, 1, 1])).toBe('{10-11}');
    expect(slipFamilyOf(Ti, [1, 1, 2])).toBe('{11-22}');
    expect(slipFamilyOf(Ti, [1, 1, 0])).toBeNull(); // (1 1 -2 0), a second-order prism plane: not listed
  });

  it('a screw candidate (b along u) has no single glide plane', () => {
    const f = fitLineDirection(l, [synthView([0, 0, 1], [2, 0, 0], [1, 1, 0], [1, 0, 0], 'a'), synthView([0, 1, 1], [1, 1, -1], [1, 1, 0], [1, 0, 0], 'b')]);
    expect(glidePlane(Cu, f, [0.5, 0.5, 0]).screw).toBe(true);
  });

  it('length: a line [1 -1 2] through a foil with normal [001], seen along [001], projects to t |u_perp| / |u.N| = t sqrt(2)/2 (by hand)', () => {
    const t = 100;
    const L = (t * Math.SQRT2) / 2;
    const c = lengthCheck(fit, { beam_cart: [0, 0, 1], normal_cart: [0, 0, 1], length_nm: L, lengthError_nm: 2, thickness_nm: t, thicknessError_nm: 5 });
    expect(c.predictedLength_nm).toBeCloseTo(L, 9);
    expect(c.impliedThickness_nm).toBeCloseTo(t, 9);
    // inclination to the surface: asin(2/sqrt 6) = 54.7356 degrees
    expect(c.inclination_deg).toBeCloseTo((Math.asin(2 / Math.sqrt(6)) * 180) / Math.PI, 9);
    expect(c.consistent).toBe(true);
    const bad = lengthCheck(fit, { beam_cart: [0, 0, 1], normal_cart: [0, 0, 1], length_nm: 2 * L, lengthError_nm: 2, thickness_nm: t, thicknessError_nm: 5 });
    expect(bad.consistent).toBe(false);
  });

  it('startingLine gives a scenario line (lattice units, largest index 1) and a search cone of at least 1 degree', () => {
    const s = startingLine(fit);
    expect(s.line).toEqual([0.5, -0.5, 1]);
    expect(s.cone_deg).toBeGreaterThanOrEqual(1);
  });
});

describe('trace analysis, synthetic traces with a known u (project image frame, frames.ts)', () => {
  const beams: [Vec3, Vec3, Vec3][] = [
    // beam, g in its zone, imageX (arbitrary, sets how the micrograph is turned)
    [[0, 0, 1], [2, 0, 0], [1, 2, 0]],
    [[0, 1, 1], [1, 1, -1], [3, 1, -1]],
    [[1, 1, 2], [2, -2, 0], [-1, 0, 1]],
    [[-1, 1, 3], [1, 1, 0], [2, 0, 1]],
  ];
  const uTrue: Vec3 = [2, -1, 5];

  it('noise-free traces from 2, 3 and 4 views give back u to 1e-8 degrees', () => {
    for (const n of [2, 3, 4]) {
      const views = beams.slice(0, n).map(([b, g, x], i) => synthView(b, g, uTrue, x, `view ${i + 1}`));
      const f = fitLineDirection(l, views);
      expect(angleDeg(f.u_cart, directionToCartesian(l, uTrue))).toBeLessThan(1e-8);
      for (const r of f.views) expect(Math.abs(r.residual_deg)).toBeLessThan(1e-8);
    }
  });

  it('with noise of 1 degree the misfits follow the propagated covariance: mean Mahalanobis^2 = 2 (chi-square, 2 dof)', () => {
    const r = rng(7);
    const truth = unit(directionToCartesian(l, uTrue));
    let sum = 0, sumChi2 = 0;
    const N = 300;
    for (let k = 0; k < N; k++) {
      const views = beams.map(([b, g, x], i) => {
        const v = synthView(b, g, uTrue, x, `view ${i + 1}`, 1);
        return { ...v, lineAngle_deg: v.lineAngle_deg + r.normal() * 1 };
      });
      const f = fitLineDirection(l, views);
      const d = dot(truth, f.u_cart) < 0 ? truth.map((x) => -x) as unknown as Vec3 : truth;
      // small-angle misfit on the principal axes, in units of their sigmas
      const a = dot(d, f.axes[0]) / (f.sigmaMajor_deg * DEG);
      const b = dot(d, f.axes[1]) / (f.sigmaMinor_deg * DEG);
      sum += a * a + b * b;
      sumChi2 += f.chi2;
    }
    // mean of a chi-square with 2 dof is 2, its standard error over 300 trials 2/sqrt(300) = 0.12
    expect(sum / N).toBeGreaterThan(2 - 0.4);
    expect(sum / N).toBeLessThan(2 + 0.4);
    // the residual chi-square has 4 - 2 = 2 degrees of freedom
    expect(sumChi2 / N).toBeGreaterThan(2 - 0.4);
    expect(sumChi2 / N).toBeLessThan(2 + 0.4);
  });

  it('a wrong trace shows as a large chi-square and residual on that view', () => {
    const views = beams.map(([b, g, x], i) => synthView(b, g, uTrue, x, `view ${i + 1}`, 1));
    const bad = [...views.slice(0, 3), { ...views[3], lineAngle_deg: views[3].lineAngle_deg + 25 }];
    const f = fitLineDirection(l, bad);
    expect(f.chi2).toBeGreaterThan(50);
  });

  it('refuses degenerate inputs with one sentence naming the view', () => {
    const v = synthView([0, 0, 1], [2, 0, 0], uTrue, [1, 0, 0], 'view 1');
    expect(() => fitLineDirection(l, [v])).toThrow(InputError);
    expect(() => fitLineDirection(l, [v, { ...v, name: 'view 2', lineAngle_deg: v.lineAngle_deg + 10 }])).toThrow(/beam directions/);
    expect(() => fitLineDirection(l, [v, { ...synthView([0, 1, 1], [1, 1, 1], uTrue, [1, 0, 0], 'view 2') }])).toThrow(/view 2.*out of the zone/);
  });

  const py = needPython('numpy', 'scipy');
  it('agrees with an independent solver (scripts/ref_traces.py: scipy Rotation frames + sphere search) for noisy traces', (ctx) => {
    py.require(ctx);
    const r = rng(11);
    for (let k = 0; k < 4; k++) {
      const views = beams.slice(0, 2 + (k % 3)).map(([b, g, x], i) => {
        const v = synthView(b, g, uTrue, x, `view ${i + 1}`, 1);
        return { ...v, lineAngle_deg: v.lineAngle_deg + 2 * r.normal() };
      });
      const f = fitLineDirection(l, views);
      const ref = JSON.parse(
        runPython([join(import.meta.dirname, '..', '..', 'scripts', 'ref_traces.py')], { views: views.map((v) => ({ beam: v.beam, g: v.g, gAngle: v.gAngle_deg, lineAngle: v.lineAngle_deg })) }).stdout,
      ) as { u: Vec3 };
      // equal weights here, so the two least-squares problems are the same: agree to the Nelder-Mead tolerance
      expect(angleDeg(f.u_cart, ref.u)).toBeLessThan(1e-3);
    }
  });

  it('symmetricEigen3 diagonalises (eigenvectors satisfy M v = lambda v)', () => {
    const M = [
      [4, 1, -2],
      [1, 3, 0.5],
      [-2, 0.5, 1],
    ];
    const e = symmetricEigen3(M);
    e.vectors.forEach((v, i) => {
      const Mv = M.map((row) => row[0] * v[0] + row[1] * v[1] + row[2] * v[2]);
      Mv.forEach((x, j) => expect(x).toBeCloseTo(e.values[i] * v[j], 10));
    });
    expect(norm(cross(e.vectors[0], e.vectors[1]))).toBeCloseTo(1, 10);
  });
});
