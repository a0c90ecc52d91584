/**
 * Shockley partials, dissociated dislocations and coherent inclusions in the
 * two-beam engine.
 */
import { describe, expect, it } from 'vitest';
import { scenario, render, maxContrast } from './helpers.js';
import { buildField, defectModel } from '../../src/imaging/fieldSpecs.js';
import { coreMask } from '../../src/imaging/cores.js';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { shockleyRibbon } from '../../src/elasticity/ribbon.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';
import { renderRows } from '../../src/imaging/renderRows.js';
import { shockleySplit } from '../../src/elasticity/dissociation.js';
import { cartesianToDirection, directionToCartesian } from '../../src/crystal/lattice.js';
import { cross, dot } from '../../src/math/vec3.js';
import { analyseInclusions } from '../../src/analysis/inclusionLobes.js';
import type { Scenario } from '../../src/scenario/types.js';

// written by `/usr/bin/python3 scripts/ref_dislocation_profiles.py` (scipy solve_ivp, alpha form, Hirth & Lothe field)
const profiles = JSON.parse(readFileSync(join(import.meta.dirname, '..', 'reference', 'dislocation-profiles.json'), 'utf8')) as {
  partials: { g: number[]; b: number[]; bf: number[] }[];
};

function renderWithModel(sc: Scenario, modify: (m: ReturnType<typeof defectModel>) => ReturnType<typeof defectModel>) {
  const c = resolveCondition(sc, sc.conditions[0]);
  const job = { ...renderJob(sc, c), model: modify(defectModel(sc)) };
  const bf = new Float32Array(job.width * job.height);
  const df = new Float32Array(job.width * job.height);
  renderRows(job, 0, job.height, bf, df);
  return { bf, df };
}

describe('Shockley partials (Howie & Whelan 1962; from memory)', () => {
  // Cu, beam [001]: a Shockley partial along [1 -1 0] at mid-depth bounding an intrinsic-type fault on the
  // inclined (111) plane that runs from the line down to the exit surface. The partial's own contrast is
  // the full image minus the image of the fault alone (same cut surface, no strain field).
  const partial = (b: string, g: number[]) =>
    scenario({
      // the alpha-form reference (scripts/ref_dislocation_profiles.py) uses the isotropic Hirth & Lothe field of the infinite medium
      elasticity: 'isotropic',
      surfaces: 'infinite',
      beam: [0, 0, 1], foil: { thickness_nm: 100, normal: [0, 0, 1] }, imageX: [1, 0, 0],
      image: { width_px: 80, height_px: 1, pixel_nm: 0.5 },
      conditions: [{ id: 'c', g, w: 0.5 }],
      defects: [{ type: 'partial', b, line: [1, -1, 0], faultPlane: [1, 1, 1], faultSide: [-1, -1, 2], point_nm: [0, 0, 50] }],
    });
  const lineContrast = (sc: Scenario) => {
    const full = renderWithModel(sc, (m) => m);
    const fault = renderWithModel(sc, (m) => ({ fields: [], surfaces: m.surfaces }));
    return full.bf.reduce((mx, v, k) => Math.max(mx, Math.abs(v - fault.bf[k])), 0);
  };
  it('images of the six partials below equal an independent alpha-form integration (scripts/ref_dislocation_profiles.py, to 1e-5)', async () => {
    // The reference integrates exp(+-2 pi i g.R) with the full displacement R of the partial, whose cut lies along
    // the fault (physics.md section 5), so the fault phase and its sign come from R itself, not from the renderer's
    // rule. Pixels reaching the core are left out (averaged by the renderer, src/imaging/cores.ts).
    // Measured: 5e-8 at tol 1e-6.
    for (const c of profiles.partials) {
      const sc = partial(`1/6[${c.b.map((x) => Math.round(6 * x)).join(' ')}]`, c.g);
      const [ci] = await render(sc, 1e-6);
      const mask = coreMask(renderJob(sc, resolveCondition(sc, sc.conditions[0])));
      let worst = 0;
      for (let i = 0; i < 80; i++) if (!mask[i]) worst = Math.max(worst, Math.abs(ci.bf[i] - c.bf[i]));
      expect(worst).toBeLessThan(1e-5);
    }
  });

  it('|g.b| = 1/3 gives much weaker line contrast than |g.b| = 2/3 for each g', () => {
    // [g, partial with |g.b| = 1/3, partial with |g.b| = 2/3]
    const cases: [number[], string, string][] = [
      [[2, 0, 0], '1/6[1 1 -2]', '1/6[-2 1 1]'],
      [[0, 2, 0], '1/6[-2 1 1]', '1/6[1 -2 1]'],
      [[2, 2, 0], '1/6[1 -2 1]', '1/6[1 1 -2]'],
    ];
    for (const [g, third, twoThirds] of cases) {
      const weak = lineContrast(partial(third, g));
      const strong = lineContrast(partial(twoThirds, g));
      // measured (w = 0.5): 0.16 vs 0.38 (200), 0.13 vs 0.38 (020), 0.08 vs 0.33 (220); the images behind these
      // numbers are checked against scipy in the test above. The isotropic model leaves some contrast at
      // |g.b| = 1/3 (the long-range field bends the fault fringes). The rule of thumb (Howie & Whelan 1962, from
      // memory) gives no number: "invisible" is read as "less than half the 2/3 contrast", and the 2/3 partial
      // must pass the 10 % "visible" threshold of src/analysis/lineContrast.ts with room (0.25).
      expect(strong).toBeGreaterThan(0.25);
      expect(weak).toBeLessThan(0.5 * strong);
    }
  });
});

describe('dissociated dislocation: fault ribbon between two Shockley partials', () => {
  // Cu, beam [001]; b = 1/2[1 -1 0] on (111), line [1 -1 0] (screw) parallel to the foil surfaces;
  // the ribbon runs along u x n, inclined through the foil.
  const base = {
    // src/elasticity/ribbon.ts (the atom-checked ribbon) is the isotropic field of the infinite medium
    elasticity: 'isotropic',
    surfaces: 'infinite',
    beam: [0, 0, 1], foil: { thickness_nm: 100, normal: [0, 0, 1] }, imageX: [1, 0, 0],
    image: { width_px: 48, height_px: 48, pixel_nm: 2 },
    conditions: [{ id: 'c', g: [2, 0, 0], w: 0.4 }],
  };
  const ribbon = scenario({ ...base, defects: [{ type: 'dissociated', b: '1/2[1 -1 0]', plane: [1, 1, 1], line: [1, -1, 0], point_nm: [0, 0, 50], separation_nm: 60 }] });
  // The ribbon of src/elasticity/ribbon.ts, whose fault is checked atom by atom (test/elasticity/dissociation.test.ts:
  // inside the ribbon the field jumps by the intrinsic fault vector, ABC|BCA stacking).
  const l = ribbon.material.lattice;
  const el = ribbon.material.elastic;
  const atomChecked = shockleyRibbon({
    lattice: l, b: [0.5, -0.5, 0], planeNormal: [1, 1, 1], lineCartesian: directionToCartesian(l, [1, -1, 0]), centre_nm: [0, 0, 50],
    poissonRatio: el.poissonRatio, shearModulus_GPa: el.shearModulus_GPa, sfe_mJ_per_m2: 45, width_nm: 60,
  });
  const pair = atomChecked.pair;
  const R = (f: { displacement(o: Float64Array, x: number, y: number, z: number): void }, p: number[]) => {
    const o = new Float64Array(3);
    f.displacement(o, p[0], p[1], p[2]);
    return [o[0], o[1], o[2]];
  };
  // the fault alone: R_f = the atom-checked field's jump along the electron path (+z) at the ribbon centre
  const eps = 1e-7;
  const jumpZ = R(atomChecked.field, [0, 0, 50 + eps]).map((v, i) => v - R(atomChecked.field, [0, 0, 50 - eps])[i]);
  const faultAlone = scenario({ ...base, defects: [{ type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 50], vector: cartesianToDirection(l, jumpZ as [number, number, number]) }] });

  it('the renderer builds the atom-checked ribbon: same displacement field, and every phase surface equals the field\'s own jump', () => {
    const model = defectModel(ribbon);
    const field = buildField(model.fields)!;
    let worst = 0;
    for (const p of [[3, -7, 20], [-11, 4, 61], [25, 25, 50], [0.5, 0.2, 49], [-40, 10, 90]]) {
      const a = R(field, p);
      const b = R(atomChecked.field, p);
      worst = Math.max(worst, ...a.map((v, i) => Math.abs(v - b[i])));
    }
    expect(worst).toBeLessThan(1e-12);
    // points on the fault plane inside the ribbon and beyond the second partial: the jump of the field across
    // the plane (along +normal) must equal the sum of the jumps of the surfaces that contain the point
    const n = model.surfaces[0].normal;
    for (const s of [-20, 0, 20, 45]) {
      const q = [s * pair.ribbonDirection[0], s * pair.ribbonDirection[1], 50 + s * pair.ribbonDirection[2]];
      const dField = R(field, q.map((v, i) => v + eps * n[i])).map((v, i) => v - R(field, q.map((w, k) => w - eps * n[k]))[i]);
      const dSurf = [0, 0, 0];
      for (const f of model.surfaces) {
        expect(Math.abs(dot(f.normal, n))).toBeCloseTo(1, 12); // both cuts lie in the fault plane
        const into = dot(q.map((v, i) => v - f.point_nm[i]) as [number, number, number], f.into!);
        if (into > 0) for (let i = 0; i < 3; i++) dSurf[i] += Math.sign(dot(f.normal, n)) * f.jump_nm[i];
      }
      for (let i = 0; i < 3; i++) expect(dField[i]).toBeCloseTo(dSurf[i], 6);
    }
  });

  it('with the partials\' strain switched off: inside the ribbon equals the fault alone, outside the perfect crystal (to 1e-7)', async () => {
    const r = renderWithModel(ribbon, (mod) => ({ fields: [], surfaces: mod.surfaces }));
    const [fa] = await render(faultAlone);
    const [perfect] = await render(scenario({ ...base, defects: [] }));
    let inside = 0;
    let outside = 0;
    for (let k = 0; k < r.bf.length; k++) {
      const isFault = Math.abs(fa.bf[k] - perfect.bf[k]) > 1e-6 || Math.abs(fa.df[k] - perfect.df[k]) > 1e-6;
      // columns whose crossing of the plane lies between the partials: the fault-alone image there
      const dIn = Math.max(Math.abs(r.bf[k] - fa.bf[k]), Math.abs(r.df[k] - fa.df[k]));
      const dOut = Math.max(Math.abs(r.bf[k] - perfect.bf[k]), Math.abs(r.df[k] - perfect.df[k]));
      if (isFault && dIn < 1e-7) inside++;
      if (dOut < 1e-7) outside++;
      expect(Math.min(dIn, dOut)).toBeLessThan(1e-7); // every column is one or the other
    }
    expect(inside).toBeGreaterThan(100);
    expect(outside).toBeGreaterThan(100);
  });

  it('with strain: far from both partials the image approaches the fault alone / perfect crystal', async () => {
    const [full] = await render(ribbon);
    const faultOnly = renderWithModel(ribbon, (mod) => ({ fields: [], surfaces: mod.surfaces }));
    // projected positions of the partials: the ribbon spans 60 nm * |ribbonDirection_xy|
    let worstFar = 0;
    let worstNear = 0;
    const rd = pair.ribbonDirection;
    for (let j = 0; j < 48; j++) for (let i = 0; i < 48; i++) {
      const x = (i + 0.5 - 24) * 2;
      const y = (j + 0.5 - 24) * 2;
      // distance in the image from the projected partial lines (lines along [1 -1 0] through +-30 rd)
      const u = [Math.SQRT1_2, -Math.SQRT1_2];
      const dist = (px: number, py: number) => Math.abs((x - px) * -u[1] + (y - py) * u[0]);
      const d = Math.min(dist(-30 * rd[0], -30 * rd[1]), dist(30 * rd[0], 30 * rd[1]));
      const k = j * 48 + i;
      const diff = Math.abs(full.bf[k] - faultOnly.bf[k]);
      if (d > 12) worstFar = Math.max(worstFar, diff);
      if (d < 2) worstNear = Math.max(worstNear, diff);
    }
    // the partials' fields fall off as 1/r; the combined far field is that of the perfect b (g.b = 1 here)
    expect(worstNear).toBeGreaterThan(0.05);
    expect(worstFar).toBeLessThan(worstNear / 2);
  });
});

describe('coherent spherical inclusion (Ashby & Brown 1963)', () => {
  const incl = (g: number[], extra: Record<string, unknown> = {}) =>
    scenario({
      image: { width_px: 65, height_px: 65, pixel_nm: 0.6 },
      foil: { thickness_nm: 80, normal: [0, 0, 1] },
      conditions: [{ id: 'c', g, s_per_nm: 0 }],
      defects: [{ type: 'inclusion', centre_nm: [0, 0, 30], radius_nm: 4, misfit: 0.02, ...extra }],
    });
  it('has a line of no contrast perpendicular to g, for every g tried (to 1e-7, float32 images)', async () => {
    const lines: Record<string, (i: number, j: number) => boolean> = {
      '2,0,0': (i) => i === 32,
      '0,2,0': (_i, j) => j === 32,
      '2,2,0': (i, j) => i + j === 64,
      '2,-2,0': (i, j) => i === j,
    };
    for (const [gs, onLine] of Object.entries(lines)) {
      const [ci] = await render(incl(gs.split(',').map(Number)));
      let worst = 0;
      let off = 0;
      for (let j = 0; j < 65; j++) for (let i = 0; i < 65; i++) {
        const d = Math.abs(ci.bf[j * 65 + i] - ci.background.bf);
        if (onLine(i, j)) worst = Math.max(worst, d);
        else off = Math.max(off, d);
      }
      expect(worst).toBeLessThan(1e-7);
      expect(off).toBeGreaterThan(0.05); // the lobes themselves are strong
    }
  });

  it('the image grows with eps r0^3, and equal eps r0^3 give the same image outside the inclusion', async () => {
    const area = (img: Float32Array, bg: number) => img.reduce((n, v) => n + (Math.abs(v - bg) > 0.1 * bg ? 1 : 0), 0);
    const [small] = await render(incl([2, 0, 0], { misfit: undefined, strain: 0.005, radius_nm: 4 }));
    const [large] = await render(incl([2, 0, 0], { misfit: undefined, strain: 0.02, radius_nm: 4 }));
    expect(area(large.bf, large.background.bf)).toBeGreaterThan(1.5 * area(small.bf, small.background.bf));
    // same eps r0^3 = 0.02 * 64 with r0 = 2 nm: identical field outside r = 4 nm
    const [same] = await render(incl([2, 0, 0], { misfit: undefined, strain: 0.02 * 8, radius_nm: 2 }));
    let worst = 0;
    for (let j = 0; j < 65; j++) for (let i = 0; i < 65; i++) {
      const r = Math.hypot((i - 32) * 0.6, (j - 32) * 0.6);
      if (r > 12) worst = Math.max(worst, Math.abs(same.bf[j * 65 + i] - large.bf[j * 65 + i]));
    }
    // columns beyond 12 nm never enter r < 4 nm, where alone the two fields differ: identical beta' (float32 images)
    expect(worst).toBeLessThan(1e-7);
  });

  it('an inclusion with zero strain is invisible', async () => {
    const [ci] = await render(incl([2, 0, 0], { misfit: 0 }));
    expect(maxContrast(ci.bf, ci.background.bf)).toBeLessThan(1e-7);
  });

  it('reversing the misfit sign puts the dark lobe on the other side of g', () => {
    const sc = incl([2, 0, 0]);
    const [a] = analyseInclusions(sc);
    const [pos, neg] = a.readings;
    expect(pos.bfDark).not.toBe('neither');
    expect(pos.bfDark).not.toBe(neg.bfDark);
  });
});
