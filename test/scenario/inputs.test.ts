/**
 * Scenario inputs that must not be silently accepted or badly hinted:
 * unknown keys get a hint from a real edit distance, families are refused
 * where one vector is meant, implausible values are warned about.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { editDistance, suggestKey } from '../../src/scenario/check.js';
import { parseMicrographSettings } from '../../src/analysis/identifySettings.js';
import { InputError } from '../../src/errors.js';

type Json = Record<string, any>;

function base(): Json {
  return {
    name: 'test',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 120, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    image: { width_px: 64, height_px: 64, pixel_nm: 0.5 },
    conditions: [{ id: 'g200', g: [2, 0, 0], s_per_nm: 0 }],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 0], point_nm: [0, 0, 60] }],
    candidates: ['1/2<110>'],
  };
}

function errorOf(edit: (o: Json) => void): string {
  const o = base();
  edit(o);
  try {
    parseScenario(o);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  return '(accepted)';
}

describe('edit distance (Damerau-Levenshtein, optimal string alignment)', () => {
  it('textbook examples (Wikipedia "Levenshtein distance" and "Damerau-Levenshtein distance", from memory)', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(editDistance('flaw', 'lawn')).toBe(2);
    expect(editDistance('ca', 'abc')).toBe(3); // 2 for unrestricted Damerau-Levenshtein, 3 for optimal string alignment
    expect(editDistance('feild', 'field')).toBe(1); // one transposition
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('abc', 'abc')).toBe(0);
  });
});

describe('unknown keys: did you mean ...?', () => {
  it('case first: weakbeam -> weakBeam (was: did you mean "w"?)', () => {
    expect(errorOf((o) => (o.conditions[0] = { id: 'wb', g: [2, 0, 0], weakbeam: 3 }))).toBe(
      'conditions[0].weakbeam: is not a known field; did you mean "weakBeam"?',
    );
  });
  it('a transposition: feild -> field in the micrograph settings (was: no hint)', () => {
    expect(() => parseMicrographSettings({ g200: { feild: 'bf' } }, ['g200'])).toThrow(
      'micrographs.g200.feild: is not a known field; did you mean "field"?',
    );
  });
  it('a missing unit suffix: thickness -> thickness_nm; a misspelling: thicknes_nm -> thickness_nm', () => {
    expect(errorOf((o) => (o.foil = { thickness: 120 }))).toMatch(/^foil\.thickness: .*did you mean "thickness_nm"\?$/);
    expect(errorOf((o) => (o.foil = { thicknes_nm: 120 }))).toMatch(/^foil\.thicknes_nm: .*did you mean "thickness_nm"\?$/);
    expect(errorOf((o) => (o.defects[0].pont_nm = [0, 0, 1]))).toMatch(/did you mean "point_nm"\?$/);
    expect(errorOf((o) => (o.Defects = []))).toMatch(/^Defects: .*did you mean "defects"\?$/);
  });
  it('no far-fetched hint: a key unlike every allowed one lists the allowed fields', () => {
    expect(errorOf((o) => (o.foil.colour = 'red'))).toBe('foil.colour: is not a known field; allowed fields: thickness_nm, normal');
    expect(suggestKey('w', ['weakBeam', 'id'])).toBeUndefined();
    expect(suggestKey('x', ['w', 's_per_nm'])).toBeUndefined();
  });
});

describe('a family where one vector is meant is refused', () => {
  it('defects[0].b: "1/2<110>" (was silently read as 1/2[1 1 0])', () => {
    expect(errorOf((o) => (o.defects[0].b = '1/2<110>'))).toBe(
      'defects[0].b: "1/2<110>" is a family (angle brackets or braces), but one vector is meant here; write one member, e.g. "1/2[110]" (families of Burgers vectors belong in "candidates")',
    );
  });
  it('lines, beams, g, fault planes and candidate objects too; braces suggest a plane in parentheses', () => {
    expect(errorOf((o) => (o.defects[0].line = '<1-10>'))).toMatch(/^defects\[0\]\.line: "<1-10>" is a family .*"\[1-10\]"/);
    expect(errorOf((o) => (o.beam = '<001>'))).toMatch(/^beam: "<001>" is a family/);
    expect(errorOf((o) => (o.conditions[0].g = '{200}'))).toMatch(/^conditions\[0\]\.g: "\{200\}" is a family .*one plane .*"\(200\)"/);
    expect(errorOf((o) => (o.candidates = [{ b: '1/2<110>' }]))).toMatch(/^candidates\[0\]\.b: .*is a family/);
    expect(
      errorOf((o) => (o.defects[0] = { type: 'fault', plane: '{111}', nature: 'intrinsic', point_nm: [0, 0, 60] })),
    ).toMatch(/^defects\[0\]\.plane: "\{111\}" is a family/);
  });
  it('families stay valid where a list is meant, and single vectors in square brackets pass', () => {
    const ok = base();
    ok.candidates = ['1/2<110>', { family: '1/6<112>' }];
    ok.defects[0].b = '1/2[1 1 0]';
    const sc = parseScenario(ok);
    expect(sc.candidates.length).toBeGreaterThan(12);
    expect(sc.defects[0].type).toBe('dislocation');
  });
});
