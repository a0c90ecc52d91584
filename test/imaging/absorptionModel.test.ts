/**
 * The thermal-diffuse absorption model inside both engines: every beam pair
 * of a many-beam set gets its own U'_{g-h}, the diagonal the model's normal
 * absorption U'_0; two beams reduce to the two-beam equations of physics.md
 * section 3 with q = 1/xi_g + i/xi'_g and 1/xi'_0 from the model (the two
 * engines agree); the scenario field "absorption" and its errors.
 * The values of U' themselves are checked against the numerical reference in
 * test/scattering/absorption.test.ts.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { OutputSet } from '../../src/output/outputSet.js';
import { renderAndWrite } from '../../src/cli/renderCommand.js';
import { scenario } from './helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { generalBeamSet } from '../../src/imaging/beamSet.js';
import { blochRow } from '../../src/imaging/blochRow.js';
import { thicknessCurves, linspace } from '../../src/analysis/blochCurves.js';
import { perfectCrystal } from '../../src/dynamics/twoBeam.js';
import { opticalPotential_per_nm2, reflectionParameters } from '../../src/scattering/reflection.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { InputError } from '../../src/errors.js';
import type { Vec3 } from '../../src/math/vec3.js';

const TD = 'thermal-diffuse' as const;

describe('scenario field "absorption"', () => {
  it('defaults to the thermal-diffuse model; "thermal-diffuse" and ratios 0..1 are accepted', () => {
    expect(scenario({ absorption: undefined }).absorption).toBe(TD);
    expect(scenario({ absorption: TD }).absorption).toBe(TD);
    expect(scenario({ absorption: 0.05 }).absorption).toBe(0.05);
    expect(scenario({ absorption: 0 }).absorption).toBe(0);
  });

  it.each([
    ['tds', /absorption: "tds" is not a known model; give "thermal-diffuse"/],
    [1.5, /absorption: must be at most 1/],
    [-0.1, /absorption: must be at least 0/],
    [{ model: TD }, /absorption: must be a finite number/],
  ])('refuses %j with a message naming the field', (v, msg) => {
    expect(() => scenario({ absorption: v })).toThrow(InputError);
    expect(() => scenario({ absorption: v })).toThrow(msg);
  });
});

describe('many-beam structure matrix with the model (physics.md section 4)', () => {
  it("a general beam set holds U'_{h_i - h_j} of the model for every pair and the model's U'_0 on the diagonal", () => {
    const sc = scenario({ absorption: TD, conditions: [{ id: 'c', g: [2, 0, 0], s_per_nm: 0.01, beams: { set: [[0, 2, 0], [2, 2, 0]] } }] });
    const c = resolveCondition(sc, sc.conditions[0]);
    const hkl: Vec3[] = [[0, 0, 0], [2, 0, 0], [0, 2, 0], [2, 2, 0]];
    const set = generalBeamSet(sc, c, hkl.slice(1));
    const n = hkl.length;
    const U0 = opticalPotential_per_nm2(sc.material, [0, 0, 0], sc.kV, TD).absRe;
    expect(U0).toBeGreaterThan(0);
    const distinct = new Set<number>();
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const a = set.input.absorptionRe_per_nm2[i * n + j];
        if (i === j) {
          expect(Math.abs(a / U0 - 1)).toBeLessThan(1e-12);
          expect(set.input.absorptionIm_per_nm2[i * n + j]).toBe(0);
          continue;
        }
        const d: Vec3 = [hkl[i][0] - hkl[j][0], hkl[i][1] - hkl[j][1], hkl[i][2] - hkl[j][2]];
        const u = opticalPotential_per_nm2(sc.material, d, sc.kV, TD);
        expect(a).toBe(u.absRe);
        expect(set.input.absorptionIm_per_nm2[i * n + j]).toBe(u.absIm);
        distinct.add(Math.round((a / set.input.potentialRe_per_nm2[i * n + j]) * 1e9));
      }
    }
    // 200-type and 220-type differences: two different ratios U'/U, not one constant
    expect(distinct.size).toBe(2);
  });

  it("a systematic row: U'_{mg} / U_{mg} grows with |m| (its own value per beam), m = 0 is U'_0", () => {
    const row = blochRow(getMaterial('Cu'), [1, 1, 1], 200, TD, 7);
    expect(row.absorption(0)[0]).toBeCloseTo(opticalPotential_per_nm2(getMaterial('Cu'), [0, 0, 0], 200, TD).absRe, 12);
    let prev = 0;
    for (let m = 1; m <= 3; m++) {
      const r = row.absorption(m)[0] / row.potential(m)[0];
      expect(r).toBeGreaterThan(prev);
      expect(row.absorption(-m)[0]).toBeCloseTo(row.absorption(m)[0], 14);
      prev = r;
    }
  });

  it('two beams with the model: the Bloch-wave engine equals the two-beam slab matrix with xi_g, xi\'_g, xi\'_0 of the model (1e-10)', () => {
    for (const [name, g] of [['Cu', [1, 1, 1]], ['alpha-Fe', [1, 1, 0]], ['Si', [2, 2, 0]]] as const) {
      const m = getMaterial(name);
      const row = blochRow(m, g as unknown as Vec3, 200, TD, 2);
      const r = reflectionParameters(m, g as unknown as Vec3, 200);
      expect(r.xiAbs0_nm).not.toBeCloseTo(r.xiAbs_nm, 0); // the model gives its own normal absorption
      const p = { xi_nm: r.xi_nm, xiAbs_nm: r.xiAbs_nm, xiAbs0_nm: r.xiAbs0_nm, s_per_nm: 0.004 };
      const t = linspace(0, 400, 21);
      const c = thicknessCurves(row, p.s_per_nm, t);
      const out = new Float64Array(4);
      t.forEach((tv, k) => {
        perfectCrystal(out, p, tv);
        expect(c[row.incident][k]).toBeCloseTo(out[0] ** 2 + out[1] ** 2, 10);
        expect(c[row.darkField][k]).toBeCloseTo(out[2] ** 2 + out[3] ** 2, 10);
      });
    }
  });

  it('the resolved condition of a scenario carries the model\'s xi\'_g and xi\'_0', () => {
    const sc = scenario({ absorption: undefined });
    const c = resolveCondition(sc, sc.conditions[0]);
    const r = reflectionParameters(sc.material, [2, 0, 0], sc.kV, { absorption: TD });
    expect(c.xiAbs_nm).toBe(r.xiAbs_nm);
    expect(c.xiAbs0_nm).toBe(r.xiAbs0_nm);
    const k = resolveCondition(scenario({}), sc.conditions[0]); // helpers give the ratio 0.1
    expect(k.xiAbs_nm).toBeCloseTo(k.xi_nm / 0.1, 9);
  });
});

describe('render.json names the absorption used', () => {
  it.each([
    [undefined, 'thermal-diffuse', /thermal diffuse scattering, Einstein model/],
    [0.1, 0.1, /constant ratio xi_g\/xi'_g = 0.1/],
  ])('absorption %j', async (given, setting, text) => {
    const dir = mkdtempSync(join(tmpdir(), 'thinfoil-abs-'));
    try {
      const sc = scenario({ absorption: given, image: { width_px: 4, height_px: 4, pixel_nm: 1 } });
      const set = OutputSet.begin(dir);
      await renderAndWrite(sc, set, false);
      set.commit();
      const j = JSON.parse(readFileSync(join(dir, 'render.json'), 'utf8'));
      expect(j.absorption.setting).toBe(setting);
      expect(j.absorption.model).toMatch(text);
      const c = resolveCondition(sc, sc.conditions[0]);
      expect(j.conditions[0].xiAbs_nm).toBe(c.xiAbs_nm);
      expect(j.conditions[0].xiAbs0_nm).toBe(c.xiAbs0_nm);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
