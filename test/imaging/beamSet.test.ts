/**
 * General beam sets (physics.md section 4): exact excitation errors from the
 * incident direction, the structure matrix for every difference g - h.
 */
import { describe, expect, it } from 'vitest';
import { scenario } from './helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';
import { columnEvaluator } from '../../src/imaging/renderRows.js';
import { excitationError, generalBeamSet } from '../../src/imaging/beamSet.js';
import { systematicRowExcitationErrors } from '../../src/dynamics/manyBeamSystematicRow.js';
import { blochWaves, amplitudesAt } from '../../src/dynamics/blochWaves.js';
import { planeNormalToCartesian } from '../../src/crystal/lattice.js';

const dislocation = { type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 40] };

describe('general beam sets', () => {
  it('the incident direction puts g at the requested s; a row written as a set has the parabolic s_ng to O(lambda^2)', () => {
    const sc = scenario({ conditions: [{ id: 'c', g: [2, 0, 0], s_per_nm: 0.02, beams: { set: [[-2, 0, 0], [4, 0, 0]] } }] });
    const c = resolveCondition(sc, sc.conditions[0]);
    const set = generalBeamSet(sc, c, [[2, 0, 0], [-2, 0, 0], [4, 0, 0]]);
    // s_g exact by construction (s = -(2 k.g + g^2)/(2K), physics.md section 3)
    expect(set.input.excitationErrors_per_nm[1]).toBeCloseTo(0.02, 12);
    // parabolic Ewald sphere s_ng = n s_g + n(1 - n) lambda g^2 / 2 (physics.md section 4): agreement to
    // second order in the Bragg angle (relative 1e-3 of lambda g^2)
    const row = systematicRowExcitationErrors(-1, 2, 0.02, c.lambda_nm, c.g_per_nm);
    const lg2 = c.lambda_nm * c.g_per_nm ** 2;
    expect(Math.abs(set.input.excitationErrors_per_nm[2] - row[0])).toBeLessThan(1e-3 * lg2); // n = -1
    expect(Math.abs(set.input.excitationErrors_per_nm[3] - row[3])).toBeLessThan(1e-3 * lg2); // n = 2
    expect(excitationError(set.k, planeNormalToCartesian(sc.material.lattice, [0, 0, 0]))).toBeCloseTo(0, 12);
  });

  it('a systematic row given as a beam set reproduces the row engine for a dislocation (to 1e-4: parabolic vs exact sphere)', () => {
    const make = (beams: unknown) =>
      scenario({ image: { width_px: 8, height_px: 8, pixel_nm: 2 }, conditions: [{ id: 'c', g: [2, 0, 0], w: 0.5, beams }], defects: [dislocation] });
    const a = make({ row: 3 });
    const b = make({ set: [[-2, 0, 0]] });
    const ea = columnEvaluator(renderJob(a, resolveCondition(a, a.conditions[0]), 1e-6));
    const eb = columnEvaluator(renderJob(b, resolveCondition(b, b.conditions[0]), 1e-6));
    const oa = new Float64Array(4);
    const ob = new Float64Array(4);
    let worst = 0;
    for (let x = -12; x <= 12; x += 1.5) {
      ea.column(oa, x, 1);
      eb.column(ob, x, 1);
      worst = Math.max(worst, Math.abs(oa[0] ** 2 + oa[1] ** 2 - ob[0] ** 2 - ob[1] ** 2), Math.abs(oa[2] ** 2 + oa[3] ** 2 - ob[2] ** 2 - ob[3] ** 2));
    }
    expect(worst).toBeLessThan(1e-4);
  });

  it('a zone-axis set without absorption keeps the total intensity 1 (Hermitian structure matrix, U_-g = conj U_g; physics.md section 4)', () => {
    // GaAs, no centre of symmetry: complex U_g; beam [001] with the 8 innermost allowed beams
    const sc = scenario({
      material: 'GaAs',
      absorption: 0,
      conditions: [{ id: 'c', g: [2, 2, 0], s_per_nm: 0.01, beams: { set: [[-2, -2, 0], [2, -2, 0], [-2, 2, 0], [4, 0, 0], [-4, 0, 0], [0, 4, 0], [0, -4, 0]] } }],
    });
    const c = resolveCondition(sc, sc.conditions[0]);
    const beams = sc.conditions[0].beams;
    if (beams.kind !== 'set') throw new Error('expected a set');
    const set = generalBeamSet(sc, c, beams.beams);
    const w = blochWaves(set.input, 0);
    const out = new Float64Array(2 * set.hkl.length);
    for (const t of [10, 57.3, 140]) {
      amplitudesAt(out, w, t);
      let sum = 0;
      for (let i = 0; i < set.hkl.length; i++) sum += out[2 * i] ** 2 + out[2 * i + 1] ** 2;
      expect(sum).toBeCloseTo(1, 10);
    }
  });

  it('renders a dislocation image with a zone-axis set (finite intensities, BF + DF <= 1)', async () => {
    const sc = scenario({
      image: { width_px: 12, height_px: 12, pixel_nm: 2 },
      conditions: [{ id: 'c', g: [2, 0, 0], w: 1, beams: { set: [[0, 2, 0], [0, -2, 0], [-2, 0, 0], [2, 2, 0]] } }],
      defects: [dislocation],
    });
    const job = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
    const ev = columnEvaluator(job);
    const o = new Float64Array(4);
    for (let x = -10; x <= 10; x += 2.5) {
      ev.column(o, x, 0);
      const bf = o[0] ** 2 + o[1] ** 2;
      const df = o[2] ** 2 + o[3] ** 2;
      expect(Number.isFinite(bf) && Number.isFinite(df)).toBe(true);
      expect(bf + df).toBeLessThanOrEqual(1 + 1e-9);
    }
  });
});
