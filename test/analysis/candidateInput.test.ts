/**
 * Candidates as users write them (issue item 5): explicit vectors ("1/2[1 1 0]", "1/6[1 1 -2]"),
 * families ("1/2<110>"), mixtures, either sign; a family on a defect's own b is an error.
 * Counts follow from cubic symmetry (1/2<110>: 6 vectors up to sign; 12 signed) and the rule
 * that b and -b are both candidates (the image changes side, Hirsch et al. 1965).
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { InputError } from '../../src/errors.js';

const base = {
  name: 'c',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 80, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 40] }],
};
const labels = (candidates: unknown[], defects: unknown[] = base.defects) => identificationCandidates(parseScenario({ ...base, defects, candidates })).map((c) => c.label);

describe('candidate Burgers vectors as written by users', () => {
  it('an explicit vector as a string gives b and -b', () => {
    expect(labels(['1/2[1 1 0]'])).toEqual(['b = 1/2[1 1 0]', 'b = 1/2[-1 -1 0]']);
    expect(labels(['1/6[1 1 -2]'])).toEqual(['b = 1/6[1 1 -2]', 'b = 1/6[-1 -1 2]']);
  });

  it('a negative vector is the same pair of hypotheses', () => {
    expect(labels(['-1/2[1 1 0]']).sort()).toEqual(['b = 1/2[-1 -1 0]', 'b = 1/2[1 1 0]']);
    expect(labels(['1/2[-1 -1 0]']).sort()).toEqual(['b = 1/2[-1 -1 0]', 'b = 1/2[1 1 0]']);
  });

  it('a family gives every member with both signs (12 for 1/2<110>, 24 for 1/6<112>)', () => {
    expect(labels(['1/2<110>']).length).toBe(12);
    expect(labels(['1/6<112>']).length).toBe(24);
  });

  it('mixtures add up and duplicates are dropped', () => {
    expect(labels(['1/2<110>', '1/6[1 1 -2]']).length).toBe(14);
    expect(labels(['1/2<110>', '1/2[1 1 0]', '-1/2[0 1 1]']).length).toBe(12);
    expect(labels(['[1 0 0]', { b: '1/2[1 -1 0]' }, { family: '1/3<111>' }]).length).toBe(2 + 2 + 8);
    // the README's list (Scenario files): 12 + 2 + 0 (a member of 1/2<110> again) + 2 + 8
    expect(labels(['1/2<110>', '1/6[1 1 -2]', '-1/2[0 1 1]', { b: '[1 0 0]' }, { family: '1/3<111>' }]).length).toBe(24);
  });

  it('hexagonal crystals take four indices for both forms (1/3<11-20>: 3 up to sign, 6 signed)', () => {
    const hex = { ...base, material: 'Mg', foil: { thickness_nm: 80, normal: [0, 0, 0, 1] }, beam: [0, 0, 0, 1], conditions: [{ id: 'g', g: [1, 1, -2, 0], w: 0.5 }] };
    const d = [{ type: 'dislocation', b: '1/3[1 1 -2 0]', line: [1, -1, 0, 0], point_nm: [0, 0, 40] }];
    const lab = (c: unknown[]) => identificationCandidates(parseScenario({ ...hex, defects: d, candidates: c })).map((x) => x.label);
    expect(lab(['1/3<11-20>']).length).toBe(6);
    expect(lab(['1/3[1 1 -2 0]'])).toEqual(['b = 1/3[1 1 -2 0]', 'b = 1/3[-1 -1 2 0]']);
    expect(lab(['1/3<11-20>', '[0 0 0 1]']).length).toBe(8);
  });

  it('a family on the defect\'s own b is refused with the field named', () => {
    const d = [{ type: 'dislocation', b: '1/2<110>', line: [1, -1, 2], point_nm: [0, 0, 40] }];
    expect(() => parseScenario({ ...base, defects: d, candidates: ['1/2<110>'] })).toThrow(InputError);
    expect(() => parseScenario({ ...base, defects: d, candidates: ['1/2<110>'] })).toThrow(/defects\[0\]\.b.*family/);
  });

  it('a malformed vector or family names the candidate', () => {
    expect(() => parseScenario({ ...base, candidates: ['1/2[1 1]'] })).toThrow(/^candidates\[0\]: /);
    expect(() => parseScenario({ ...base, candidates: ['1/2<110'] })).toThrow(/candidates\[0\]/);
    expect(() => parseScenario({ ...base, candidates: ['[0 0 0]'] })).toThrow(/candidates\[0\]/);
  });
});
