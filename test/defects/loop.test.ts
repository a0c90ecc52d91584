/**
 * The loop defect type (src/defects/loop.ts): reading and refusing scenario
 * entries, the jump surface, the core mask, and images checked against
 * published statements about loop contrast.
 */
import { describe, expect, it } from 'vitest';
import { render, scenario } from '../imaging/helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';
import { translationPlan } from '../../src/imaging/translationColumns.js';
import { coreMask } from '../../src/imaging/cores.js';
import { InputError } from '../../src/errors.js';
import type { Scenario } from '../../src/scenario/types.js';

const FRANK = { type: 'loop', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [0, 0, 50], radius_nm: 12 };

function refusal(defect: Record<string, unknown>): string {
  try {
    scenario({ defects: [defect] });
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  throw new Error('not refused');
}

describe('loop entries: reading and one-sentence refusals naming the field', () => {
  it('a Frank loop with an intrinsic fault is read; the label names the fault', () => {
    const sc = scenario({ defects: [{ ...FRANK, fault: 'intrinsic' }] });
    const d = sc.defects[0];
    expect(d.type).toBe('loop');
    expect(d.label).toContain('intrinsic loop');
  });
  it('refusals', () => {
    expect(refusal({ ...FRANK, vertices_nm: [[0, 0], [1, 0], [0, 1]] })).toMatch(/^defects\[0\]: must give exactly one of "radius_nm".*"vertices_nm"/);
    expect(refusal({ ...FRANK, fault: 'extrinsic' })).toMatch(/^defects\[0\]\.fault: .*Burgers vector/);
    expect(refusal({ ...FRANK, b: '1/2[1 1 0]', normal: [1, 1, 0], fault: 'intrinsic' })).toMatch(/^defects\[0\]\.fault: .*\{111\}/);
    expect(refusal({ ...FRANK, centre_nm: [0, 0, 5] })).toMatch(/^defects\[0\]\.centre_nm: .*cuts it/);
    expect(refusal({ ...FRANK, radius_nm: undefined, vertices_nm: [[0, 0], [4, 4], [4, 0], [0, 4]] })).toMatch(/^defects\[0\]\.vertices_nm: edges 0 and 2 cross/);
    expect(refusal({ ...FRANK, radius_nm: undefined, vertices_nm: [[0, 0], [1, 1], [2, 2]] })).toMatch(/vertices_nm: encloses no area/);
    expect(refusal({ ...FRANK, normal: [0, 0, 0] })).toMatch(/^defects\[0\]\.normal: /);
    expect(refusal({ ...FRANK, fault: 'intrinsik' })).toMatch(/^defects\[0\]\.fault: "intrinsik" is not a fault/);
    for (const m of [refusal({ ...FRANK, centre_nm: [0, 0, 5] }), refusal({ ...FRANK, fault: 'extrinsic' })]) expect(m.split('\n')).toHaveLength(1);
  });
  it('a fault vector equal to b up to a lattice translation is accepted (Shockley loop 1/6[1 1 -2] with R = -1/3[1 1 1])', () => {
    // 1/6[1 1 -2] - (-1/3[1 1 1]) = 1/2[1 1 0], a translation of the fcc lattice
    const sc = scenario({ defects: [{ type: 'loop', b: '1/6[1 1 -2]', normal: [1, 1, 1], centre_nm: [0, 0, 50], radius_nm: 8, fault: '-1/3[1 1 1]' }] });
    expect(sc.defects[0].type).toBe('loop');
  });
});

function job(sc: Scenario, i = 0) {
  return renderJob(sc, resolveCondition(sc, sc.conditions[i]));
}

describe('loop model: jump surface, shared columns, cores', () => {
  const sc = scenario({
    foil: { thickness_nm: 100, normal: [0, 0, 1] },
    image: { width_px: 48, height_px: 48, pixel_nm: 1 },
    defects: [FRANK],
  });
  it('the loop adds one field and one polygon jump surface with jump -b (crossing along +n, R drops by b)', () => {
    const j = job(sc);
    expect(j.model.fields).toHaveLength(1);
    expect(j.model.surfaces).toHaveLength(1);
    const s = j.model.surfaces[0];
    expect(s.kind).toBe('polygon');
    const a = 0.36149; // Cu, data/materials.json
    for (let i = 0; i < 3; i++) expect(s.jump_nm[i]).toBeCloseTo(-a / 3, 6);
  });
  it('translationPlan declines a loop (its field is not invariant along a line)', () => {
    const j = job(sc);
    expect(translationPlan(j, { ignoreGain: true })).toBeNull();
  });
  it('the core mask marks the projected loop line and nothing at the centre or far away', () => {
    const j = job(sc);
    const m = coreMask(j);
    const n = m.reduce((s, v) => s + v, 0);
    expect(n).toBeGreaterThan(40); // an ellipse of semi-axes 12 and 12 cos(54.7 deg) nm: about 60 nm of line
    expect(m[24 * 48 + 24]).toBe(0);
    expect(m[0]).toBe(0);
  });
});
