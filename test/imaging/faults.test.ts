/**
 * Planar faults, partial dislocations, dissociated dislocations, antiphase
 * boundaries and overlapping faults in the two-beam engine (physics.md
 * sections 5 and 6).
 */
import { describe, expect, it } from 'vitest';
import { scenario, render, maxContrast } from './helpers.js';
import { analyseFaults, faultGeometry, faultPhase_deg, profileAcross } from '../../src/analysis/faultFringes.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import type { FaultSpec } from '../../src/scenario/types.js';

// Cu foil near [011]: the (1 1 -1) plane... use (1 1 1), inclined by 35 deg to the beam [011]
function faultScenario(g: number[], dev: Record<string, number>, fault: Record<string, unknown>, extra: Record<string, unknown> = {}) {
  return scenario({
    beam: [0, 1, 1],
    foil: { thickness_nm: 150, normal: [0, 1, 1] },
    imageX: [1, 0, 0],
    image: { width_px: 48, height_px: 48, pixel_nm: 4 },
    conditions: [{ id: 'c', g, ...dev }],
    defects: [{ type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 75], ...fault }],
    ...extra,
  });
}

function profiles(sc: ReturnType<typeof faultScenario>, vector?: [number, number, number], samples = 600) {
  const f = sc.defects[0] as FaultSpec;
  const c = resolveCondition(sc, sc.conditions[0]);
  const geo = faultGeometry(sc, f, c);
  return { geo, c, ...profileAcross(sc, c, geo.P, geo.n, vector ?? f.vector, geo.bottom, geo.topDirection, geo.width_nm, samples) };
}

describe('fault phase alpha = 2 pi g.R_f mod 2 pi (physics.md section 5)', () => {
  it('reduces to (-180, 180] degrees', () => {
    expect(faultPhase_deg([1, -1, 1], [1 / 3, 1 / 3, 1 / 3])).toBeCloseTo(120, 9);
    expect(faultPhase_deg([2, 0, 0], [1 / 3, 1 / 3, 1 / 3])).toBeCloseTo(-120, 9);
    expect(faultPhase_deg([2, 0, 0], [-1 / 3, -1 / 3, -1 / 3])).toBeCloseTo(120, 9);
    expect(faultPhase_deg([2, 2, 0], [1 / 6, 1 / 6, -1 / 3])).toBeCloseTo(-120, 9); // g.R = 2/3
  });

  it('a fault with integer g.R_f is invisible: computed with its phase applied, not skipped (to 1e-6)', async () => {
    // The two-beam renderer skips surfaces with alpha = 2 pi n (a short-cut that would make this test true by
    // construction). The beam set {000, g} is the same two-beam problem (physics.md section 4) but its engine
    // applies every surface's phase exp(2 pi i g_j . R_f) to every beam, so the phase is really computed here.
    // g = 0 2 -2 with R_f = 1/3[1 1 1] (g.R = 0) and R_f = 1/2[1 0 1] (g.R = -1)
    for (const vector of ['1/3[1 1 1]', '1/2[1 0 1]']) {
      const [ci] = await render(faultScenario([0, 2, -2], { s_per_nm: 0 }, { vector }, { conditions: [{ id: 'c', g: [0, 2, -2], s_per_nm: 0, beams: { set: [[0, 2, -2]] } }] }));
      expect(maxContrast(ci.bf, ci.background.bf)).toBeLessThan(1e-6);
      expect(maxContrast(ci.df, ci.background.df)).toBeLessThan(1e-6);
    }
    // the same fault with g.R = 1/3 through the same engine is visible (the engine does apply the phase)
    const [vis] = await render(faultScenario([1, -1, 1], { s_per_nm: 0 }, { vector: '1/3[1 1 1]' }, { conditions: [{ id: 'c', g: [1, -1, 1], s_per_nm: 0, beams: { set: [[1, -1, 1]] } }] }));
    expect(maxContrast(vis.bf, vis.background.bf)).toBeGreaterThan(0.05);
  });

  it('the same fault with g.R_f = 1/3 is visible', async () => {
    const [ci] = await render(faultScenario([1, -1, 1], { s_per_nm: 0 }, { vector: '1/3[1 1 1]' }));
    expect(maxContrast(ci.bf, ci.background.bf)).toBeGreaterThan(0.05);
  });
});

describe('inclined stacking fault, two-beam with absorption (Hashimoto, Howie & Whelan 1962)', () => {
  const sc = faultScenario([1, -1, 1], { s_per_nm: 0 }, { nature: 'intrinsic' });
  const p = profiles(sc);
  const n = p.bf.length;

  it('bright-field fringes are symmetric about the centre of the fault, dark-field fringes are not', () => {
    let asymBF = 0;
    let asymDF = 0;
    for (let i = 0; i < n; i++) {
      asymBF = Math.max(asymBF, Math.abs(p.bf[i] - p.bf[n - 1 - i]));
      asymDF = Math.max(asymDF, Math.abs(p.df[i] - p.df[n - 1 - i]));
    }
    expect(asymBF).toBeLessThan(1e-9);
    expect(asymDF).toBeGreaterThan(0.01);
  });

  it('the outer fringe at the top surface is alike in BF and DF, the one at the bottom opposite', () => {
    const [a] = analyseFaults(sc);
    for (const r of a.readings) {
      expect(r.bf.top).toBe(r.df.top);
      expect(r.bf.bottom).not.toBe(r.df.bottom);
      expect(r.bf.top).toBe(r.bf.bottom); // BF outer fringes alike
    }
  });

  it('alpha -> -alpha reverses the bright-field outer fringes', () => {
    const [a] = analyseFaults(sc);
    const [intr, extr] = a.readings;
    expect(intr.alpha_deg).toBeCloseTo(-extr.alpha_deg, 9);
    expect(intr.bf.top).not.toBe(extr.bf.top);
    expect(intr.bf.bottom).not.toBe(extr.bf.bottom);
  });

  it('fringe period in depth near the surface is xi_eff = xi_g / sqrt(1 + w^2) (Hirsch et al. 1965)', () => {
    // With absorption the fringes near a surface come from the interference of the two Bloch waves and repeat
    // every xi_eff of depth; deeper in a thick foil they fade and drift (Hirsch et al. 1965). We measure the
    // spacing of the two bright-field maxima nearest the top surface in a 300 nm foil.
    for (const w of [0, 1]) {
      const s2 = faultScenario([1, -1, 1], { w }, { nature: 'intrinsic' }, { foil: { thickness_nm: 300, normal: [0, 1, 1] } });
      const q = profiles(s2, undefined, 3000);
      // depth of the fault crossing falls linearly from L (bottom end) to 0 (top end) along the profile
      const L = q.c.frame.columnLength_nm;
      const depths: number[] = [];
      for (let i = 1; i < q.bf.length - 1; i++) if (q.bf[i] > q.bf[i - 1] && q.bf[i] >= q.bf[i + 1]) depths.push(L * (1 - (i + 0.5) / q.bf.length));
      const shallow = depths.sort((a, b) => a - b).slice(0, 2);
      const period = shallow[1] - shallow[0];
      const xiEff = q.c.xi_nm / Math.sqrt(1 + w * w);
      // measured here: +1.7 % at w = 0, +0.6 % at w = 1 (absorption and the surface shift the fringes slightly)
      expect(Math.abs(period - xiEff) / xiEff).toBeLessThan(0.03);
    }
  });
});

describe('overlapping faults: phases add', () => {
  it('two coincident faults 1/3[1 1 1] give the image of one fault 2/3[1 1 1] (to 1e-7, float32 images)', async () => {
    const common = {
      beam: [0, 1, 1], foil: { thickness_nm: 150, normal: [0, 1, 1] }, imageX: [1, 0, 0],
      image: { width_px: 24, height_px: 24, pixel_nm: 6 },
      conditions: [{ id: 'c', g: [1, -1, 1], w: 0.3 }],
    };
    const twoFaults = scenario({
      ...common,
      defects: [
        { type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 75], vector: '1/3[1 1 1]' },
        { type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 75], vector: '1/3[1 1 1]' },
      ],
    });
    const one = scenario({ ...common, defects: [{ type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 75], vector: '2/3[1 1 1]' }] });
    const single = scenario({ ...common, defects: [{ type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 75], vector: '1/3[1 1 1]' }] });
    const [a] = await render(twoFaults);
    const [b] = await render(one);
    const [c] = await render(single);
    let diffTwo = 0;
    let diffSingle = 0;
    for (let i = 0; i < a.bf.length; i++) {
      diffTwo = Math.max(diffTwo, Math.abs(a.bf[i] - b.bf[i]), Math.abs(a.df[i] - b.df[i]));
      diffSingle = Math.max(diffSingle, Math.abs(a.bf[i] - c.bf[i]));
    }
    expect(diffTwo).toBeLessThan(1e-7);
    expect(diffSingle).toBeGreaterThan(0.01); // the doubled phase really differs from one fault
  });
});

describe('antiphase boundary in an ordered L1_2 crystal (superlattice reflections)', () => {
  const apb = (g: number[]) =>
    scenario({
      material: 'Ni3Al',
      beam: [0, 0, 1], foil: { thickness_nm: 80, normal: [0, 0, 1] }, imageX: [1, 0, 0],
      image: { width_px: 32, height_px: 8, pixel_nm: 4 },
      conditions: [{ id: 'c', g, s_per_nm: 0 }],
      defects: [{ type: 'fault', plane: [1, 0, 1], point_nm: [0, 0, 40], vector: '1/2[1 1 0]' }],
    });
  it('visible with the superlattice reflection 100 (alpha = pi), invisible with the fundamental 200', async () => {
    const [sup] = await render(apb([1, 0, 0]));
    expect(maxContrast(sup.bf, sup.background.bf)).toBeGreaterThan(0.02);
    // g.R = 1 for 200: computed with the phase applied (beam set {000, g}; the two-beam renderer would skip it)
    const sc = apb([2, 0, 0]);
    const [fund] = await render({ ...sc, conditions: [{ ...sc.conditions[0], beams: { kind: 'set', beams: [[2, 0, 0]] } }] });
    expect(maxContrast(fund.bf, fund.background.bf)).toBeLessThan(1e-6);
  });
});
