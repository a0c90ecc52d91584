/** Candidates for identification and the view that lays a simulation over a micrograph. */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { identificationCandidates, variantScenario, visibilityNote } from '../../src/analysis/candidates.js';
import { judge } from '../../src/analysis/visibility.js';
import { conditionView, simulatedGAngle_deg } from '../../src/analysis/identifyView.js';
import { imageFrame, imagePointToCrystal } from '../../src/geometry/frames.js';
import { directionToCartesian } from '../../src/crystal/lattice.js';
import { InputError } from '../../src/errors.js';

const base = {
  name: 'c',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 80, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
  ],
};

function sc(over: Record<string, unknown>): Scenario {
  return parseScenario({ ...base, ...over });
}

describe('Burgers-vector candidates', () => {
  const s = sc({ defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [3, -2, 40] }], candidates: ['1/2<110>'] });

  it('1/2<110> gives 12 candidates: every member with both signs (b and -b flip the image side, Hirsch et al. 1965)', () => {
    const c = identificationCandidates(s);
    expect(s.candidates.length).toBe(6); // the family with signs collapsed (parse.ts)
    expect(c.length).toBe(12);
    expect(new Set(c.map((x) => x.label)).size).toBe(12);
    for (const x of c) expect(c.some((y) => y.b!.every((v, i) => v === -x.b![i]))).toBe(true);
    expect(c.map((x) => x.label)).toContain('b = 1/2[-1 -1 0]');
  });

  it('variantScenario replaces only the target defect and leaves the scenario untouched', () => {
    const c = identificationCandidates(s).find((x) => x.label === 'b = 1/2[0 1 -1]')!;
    const v = variantScenario(s, c);
    expect(v.defects[0]).toMatchObject({ type: 'dislocation', b: [0, 0.5, -0.5], line: [1, -1, 2], point_nm: [3, -2, 40] });
    expect(s.defects[0]).toMatchObject({ b: [0.5, 0.5, 0] });
    expect(v.conditions).toBe(s.conditions);
  });

  it('the g.b note is the visibility rule of visibility.ts', () => {
    const c = identificationCandidates(s)[0];
    const n = visibilityNote(s.material.lattice, c, s.conditions[1]);
    const j = judge(s.material.lattice, s.conditions[1].g, c.b!, c.line);
    expect(n).toMatchObject({ quantity: 'g.b', value: j.gb, verdict: j.verdict, rule: j.rule });
  });

  it('refuses an empty candidate list and a defect index that does not exist', () => {
    const bare = sc({ defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2] }] });
    expect(() => identificationCandidates(bare)).toThrow(InputError);
    expect(() => identificationCandidates(bare)).toThrow(/candidates/);
    expect(() => identificationCandidates(s, 3)).toThrow(/--defect 3/);
    expect(() => identificationCandidates(sc({ candidates: ['1/2<110>'] }))).toThrow(/defects is empty/);
  });

  it('a loop takes the same signed list, without repeats, each labelled with its nature (b.n > 0 vacancy, loop.ts)', () => {
    const loop = { type: 'loop', b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 40], radius_nm: 10 };
    // the family 1/2<110> already holds 1/2[1 0 1]: 12 candidates, not 14
    const c = identificationCandidates(sc({ defects: [loop], candidates: ['1/2<110>', '1/2[1 0 1]'] }));
    expect(c.length).toBe(12);
    expect(new Set(c.map((x) => x.label)).size).toBe(12);
    // by hand: n = (1 0 1)/sqrt2; [1 0 1].n > 0 vacancy, [-1 0 -1].n < 0 interstitial, [1 0 -1].n = 0 shear
    expect(c.map((x) => x.label)).toEqual(expect.arrayContaining(['b = 1/2[1 0 1] (vacancy)', 'b = 1/2[-1 0 -1] (interstitial)', 'b = 1/2[1 0 -1] (shear)']));
    for (const x of c) expect(x.defect).toMatchObject({ type: 'loop', b: x.b, radius_nm: 10 });
    const empty = sc({ defects: [loop] });
    expect(() => identificationCandidates(empty)).toThrow(/^candidates is empty; list the Burgers vectors to compare, e\.g\. "candidates": \["1\/3<111>", "1\/2<110>"\]$/);
  });

  it('a dissociated dislocation keeps only candidates in its glide plane', () => {
    const d = sc({ defects: [{ type: 'dissociated', b: '1/2[1 -1 0]', plane: [1, 1, 1], line: [1, -1, 0], separation_nm: 4 }], candidates: ['1/2<110>'] });
    const c = identificationCandidates(d);
    expect(c.length).toBe(6); // 1/2<110> in (111): [1 -1 0], [1 0 -1], [0 1 -1] with signs
    for (const x of c) expect(x.b![0] + x.b![1] + x.b![2]).toBeCloseTo(0, 12);
  });
});

describe('fault-nature and misfit-sign candidates', () => {
  it('a fault gives the fault vector and its negative: intrinsic and extrinsic (physics.md section 5)', () => {
    const s = sc({ defects: [{ type: 'fault', plane: [1, 1, 1], nature: 'intrinsic', point_nm: [0, 0, 40] }] });
    const c = identificationCandidates(s);
    expect(c.map((x) => x.kind)).toEqual(['faultNature', 'faultNature']);
    expect(c[0].label).toMatch(/^intrinsic/);
    expect(c[1].label).toMatch(/^extrinsic/);
    c[0].faultVector!.forEach((v, i) => expect(c[1].faultVector![i]).toBeCloseTo(-v, 12));
    // alpha = 2 pi g.R: g.R = +-2/3 for g = 200 and R = +-1/3[1 1 1]
    const n = visibilityNote(s.material.lattice, c[0], s.conditions[0]);
    expect(n.quantity).toBe('g.R');
    expect(Math.abs(n.value!)).toBeCloseTo(2 / 3, 9);
  });

  it('an inclusion gives both signs of the misfit', () => {
    const s = sc({ defects: [{ type: 'inclusion', centre_nm: [0, 0, 40], radius_nm: 6, misfit: -0.02 }] });
    const c = identificationCandidates(s);
    expect(c.map((x) => x.label)).toEqual(['misfit +0.02', 'misfit -0.02']);
    expect(c[0].strain! > 0 && c[1].strain! < 0).toBe(true);
    expect(c[0].strain).toBeCloseTo(-c[1].strain!, 15);
    expect(visibilityNote(s.material.lattice, c[0], s.conditions[0]).quantity).toBe('');
  });
});

describe('conditionView: the simulation turned to the micrograph', () => {
  const s = sc({ defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [7, -4, 33] }], candidates: ['1/2<110>'] });

  it.each([0, 37, -120, 200])('g points at %f degrees on the screen in the view', (angle) => {
    for (const cond of s.conditions) {
      const v = conditionView(s, cond, angle, 32, 24, 0.8);
      const got = simulatedGAngle_deg(v, cond);
      const d = ((got - angle) % 360 + 540) % 360 - 180;
      expect(Math.abs(d)).toBeLessThan(1e-9);
      expect(v.image).toEqual({ width_px: 32, height_px: 24, pixel_nm: 0.8 });
      expect(v.conditions).toEqual([cond]);
    }
  });

  it('keeps every defect at the same place in the crystal (frames.ts)', () => {
    const l = s.material.lattice;
    const ref = (x: Scenario) => imageFrame(directionToCartesian(l, x.beam), x.imageX_cart, directionToCartesian(l, x.foilNormal), x.thickness_nm);
    const before = imagePointToCrystal(ref(s), s.defects[0].type === 'dislocation' ? s.defects[0].point_nm : [0, 0, 0]);
    const v = conditionView(s, s.conditions[1], 63, 16, 16, 1);
    const d = v.defects[0];
    const after = imagePointToCrystal(ref(v), d.type === 'dislocation' ? d.point_nm : [0, 0, 0]);
    before.forEach((x, i) => expect(after[i]).toBeCloseTo(x, 9));
    // the depth below the entrance surface does not change
    expect(d.type === 'dislocation' && d.point_nm[2]).toBeCloseTo(33, 9);
  });
});
