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
import { scenarioWarnings } from '../../src/analysis/scenarioWarnings.js';

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

describe('implausible values are warned about, impossible ones refused (thresholds in README)', () => {
  const warningsOf = (edit: (o: Json) => void) => {
    const o = base();
    edit(o);
    return scenarioWarnings(parseScenario(o));
  };
  it('the base scenario has no warning', () => {
    expect(warningsOf(() => {})).toEqual([]);
  });
  it('thickness 0.15 nm (typed in micrometres): one warning naming the field and the likely unit', () => {
    const w = warningsOf((o) => {
      o.foil.thickness_nm = 0.15;
      o.defects = [];
    });
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/^foil\.thickness_nm is 0\.15 nm, thinner than 5 nm .*micrometres \(150 nm\)\?$/);
    expect(warningsOf((o) => (o.foil.thickness_nm = 4000))[0]).toMatch(/^foil\.thickness_nm is 4000 nm, thicker than/);
    expect(warningsOf((o) => (o.image.pixel_nm = 50))[0]).toMatch(/^image\.pixel_nm is 50 nm/);
    expect(warningsOf((o) => (o.image.pixel_nm = 0.02))[0]).toMatch(/^image\.pixel_nm is 0\.02 nm/);
  });
  it('a line 0.4 degrees from the surfaces with relaxed surfaces (the default): warned that its corrections relax little so far from where it meets them, not with the infinite medium nor when exactly parallel', () => {
    // tan(0.4 deg) = 0.007: a line [1 1 0.01] at depth 60 nm meets the surfaces 60 / 0.007 nm = 71 foil thicknesses away
    // (the measured residual traction of the inclined-line corrections: 18-73 % at 0.4 t, about all beyond 1.5 t;
    // test/elasticity/surfaceInclinedPlate.test.ts)
    const w = warningsOf((o) => {
      o.defects[0].line = [1, 1, 0.01];
      o.defects[0].point_nm = [0, 0, 60];
    });
    expect(w.some((s) => /^defects\[0\] .*runs 0\.41 degrees from the foil surfaces .*relax little this far away; a line exactly parallel/.test(s))).toBe(true);
    const quiet = (edit: (o: Json) => void) => warningsOf(edit).some((s) => /relax little/.test(s));
    expect(quiet((o) => { o.defects[0].line = [1, 1, 0.01]; o.defects[0].point_nm = [0, 0, 60]; o.surfaces = 'infinite'; })).toBe(false);
    expect(quiet((o) => { o.defects[0].line = [1, 1, 0]; o.defects[0].point_nm = [0, 0, 60]; })).toBe(false);
    expect(quiet((o) => { o.defects[0].line = [1, -1, 2]; })).toBe(false);
  });
  it('a dislocation point at depth 500 nm in a 120 nm foil: where the line crosses the foil, and that it misses the view', () => {
    // line [1 -1 2] in an untilted (001) foil: it rises 2 nm in depth per sqrt(2) nm sideways, so from depth 500 nm
    // it reaches the exit surface (120 nm) 380 / sqrt(2) = 269 nm away along [-1 1 0] and the entrance 354 nm away
    const w = warningsOf((o) => {
      o.defects[0].line = [1, -1, 2];
      o.defects[0].point_nm = [0, 0, 500];
    });
    expect(w).toHaveLength(2);
    expect(w[0]).toMatch(/^defects\[0\] .*point_nm is at depth 500 nm, outside the 120 nm foil; the line is drawn where it crosses the foil/);
    expect(w[1]).toMatch(/^defects\[0\] .*the part of the line inside the foil lies outside the 32 x 32 nm field of view/);
    // geometry of the crossing: |x|, |y| of the two ends as computed by hand above (x along [1 0 0], y along [0 1 0]: 269/sqrt 2 = 190)
    const ends = [...w[0].matchAll(/\((-?[\d.]+), (-?[\d.]+)\)/g)].map((m) => [Number(m[1]), Number(m[2])]);
    expect(ends.map(([x]) => Math.abs(x)).sort((p, q) => p - q)).toEqual([190, 250]);
  });
  it('a line that crosses the foil inside the view gives no warning; one that crosses just outside does', () => {
    expect(warningsOf((o) => (o.defects[0].line = [1, -1, 2]))).toEqual([]);
    // the line [1 -1 0] parallel to the surfaces, moved 40 nm sideways (along [1 1 0]) out of a 32 nm view
    const w = warningsOf((o) => (o.defects[0].point_nm = [28.3, 28.3, 60]));
    expect(w).toHaveLength(1);
    expect(w[0]).toMatch(/field of view/);
  });
  it('impossible: a defect wholly outside the crystal is refused naming the field', () => {
    expect(errorOf((o) => (o.defects[0].point_nm = [0, 0, 500]))).toMatch(
      /^defects\[0\]\.point_nm: the line is parallel to the surfaces at depth 500 nm, wholly outside the 120 nm foil; give a depth from 0 to 120 nm/,
    );
    expect(errorOf((o) => (o.defects[0] = { type: 'inclusion', centre_nm: [0, 0, 200], radius_nm: 5, misfit: 0.01 }))).toMatch(
      /^defects\[0\]\.centre_nm: the inclusion .* lies wholly outside the 120 nm foil/,
    );
    expect(errorOf((o) => (o.defects[0] = { type: 'fault', plane: [0, 0, 1], vector: '1/2[1 1 0]', point_nm: [0, 0, -3] }))).toMatch(
      /^defects\[0\]\.point_nm: the fault plane is parallel to the surfaces/,
    );
    // an inclusion cut by the surface is a real case and stays valid
    expect(errorOf((o) => (o.defects[0] = { type: 'inclusion', centre_nm: [0, 0, 122], radius_nm: 5, misfit: 0.01 }))).toBe('(accepted)');
  });
});
