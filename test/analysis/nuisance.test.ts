/**
 * Ranges of the fitted parameters from the scenario (defaults, stated ranges,
 * measured values with uncertainties as `thinfoil measure --json` reports
 * them) and the scenario a parameter vector gives. Plumbing; the geometry of
 * the line cone is checked against the angle worked out by hand.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { prepareMicrographs } from '../../src/analysis/identifyMicrographs.js';
import { parseMicrographSettings } from '../../src/analysis/identifySettings.js';
import { DEFAULT_FIT, parseFitSettings } from '../../src/analysis/fitSettings.js';
import { directionAngle_deg, nuisanceModel } from '../../src/analysis/nuisance.js';
import { InputError } from '../../src/errors.js';
import { fitWarnings } from '../../src/analysis/scenarioWarnings.js';

const sc = parseScenario({
  name: 'n',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 80, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  conditions: [
    { id: 'g200', g: [2, 0, 0], w: 0.5 },
    { id: 'g020', g: [0, 2, 0], w: 0.5 },
  ],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [3, 1, 1], point_nm: [0, 0, 40] }],
  candidates: [{ b: '1/2[1 1 0]' }],
});
const img = { width: 32, height: 32, data: Float32Array.from({ length: 1024 }, (_, i) => 100 + (i % 5)) };

function model(micrographs: unknown, fit: unknown) {
  const settings = parseMicrographSettings(micrographs, ['g200', 'g020']);
  const preps = prepareMicrographs(sc, ['g200', 'g020'].map((id) => ({ conditionId: id, image: img, source: `${id}.tif`, filePixel_nm: 1 })), settings);
  return nuisanceModel(sc, identificationCandidates(sc)[0], preps, parseFitSettings(fit));
}

describe('nuisance parameters and their ranges', () => {
  it('defaults: thickness +-15 %, depth +-t/4, line cone 5 degrees, w +-0.3', () => {
    const m = model(undefined, undefined);
    const p = Object.fromEntries(m.parameters.map((x) => [x.name, x]));
    expect([p.thickness.lo, p.thickness.hi]).toEqual([68, 92]);
    expect([p.depth.lo, p.depth.hi]).toEqual([20, 60]);
    expect([p['line tilt a'].lo, p['line tilt a'].hi]).toEqual([-5, 5]);
    expect(p['w g200'].lo).toBeCloseTo(0.2, 12);
    expect(p['w g200'].hi).toBeCloseTo(0.8, 12);
    expect(p['w g200'].scope).toBe(0);
    expect(p.thickness.scope).toBe('shared');
  });
  it('measured values (w 0.62 +- 0.05 on g020, thickness 84 +- 3 nm) centre the ranges at +- 2 uncertainties', () => {
    const m = model({ g020: { gAngle_deg: 0, w: 0.62, wError: 0.05 } }, { thickness_nm: 84, thicknessError_nm: 3 });
    const p = Object.fromEntries(m.parameters.map((x) => [x.name, x]));
    expect([p.thickness.nominal, p.thickness.lo, p.thickness.hi, p.thickness.from]).toEqual([84, 78, 90, 'measured']);
    expect(p['w g020'].nominal).toBe(0.62);
    expect(p['w g020'].lo).toBeCloseTo(0.52, 12);
    expect(p['w g020'].hi).toBeCloseTo(0.72, 12);
    expect(p['w g020'].from).toBe('measured');
    expect(p['w g200'].from).toBe('default range');
  });
  it('a parameter vector gives the scenario: thickness, depth, w per condition, and a line tilted by at most the cone', () => {
    const m = model(undefined, { lineCone_deg: 4 });
    const names = m.parameters.map((x) => x.name);
    const v = m.parameters.map((x) => x.nominal);
    v[names.indexOf('thickness')] = 85;
    v[names.indexOf('depth')] = 30;
    v[names.indexOf('w g020')] = 0.7;
    v[names.indexOf('line tilt a')] = 3;
    v[names.indexOf('line tilt b')] = 4; // outside the disc: pulled back to the rim, 4 degrees
    const { scenario, conditions } = m.apply(v);
    expect(scenario.thickness_nm).toBe(85);
    const d = scenario.defects[0];
    expect('point_nm' in d && d.point_nm[2]).toBe(30);
    expect(conditions[1].deviation).toEqual({ kind: 'w', w: 0.7 });
    expect(conditions[0].deviation).toEqual({ kind: 'w', w: 0.5 });
    expect(m.tilt_deg(v)).toBeCloseTo(4, 12);
    // tilt by tan-combination: the angle between u and u + tan(a) e1 + tan(b) e2 is atan(hypot(tan a, tan b))
    const a = (3 * 4) / 5;
    const b = (4 * 4) / 5;
    const expected = (Math.atan(Math.hypot(Math.tan((a * Math.PI) / 180), Math.tan((b * Math.PI) / 180))) * 180) / Math.PI;
    if (d.type !== 'dislocation') throw new Error('expected a dislocation');
    expect(directionAngle_deg(sc, d.line, [3, 1, 1])).toBeCloseTo(expected, 9);
  });
  it('bad fit settings are one InputError naming the field', () => {
    expect(() => parseFitSettings({ wRange: -1 })).toThrow(InputError);
    expect(() => parseFitSettings({ wRange: -1 })).toThrow(/fit\.wRange: must be at least 0/);
    expect(() => parseFitSettings({ thicknessError_nm: 2 })).toThrow(/fit\.thicknessError_nm: needs the measured "thickness_nm"/);
    // a fractional range beside a measured thickness with its error would be silently ignored: refused instead
    expect(() => parseFitSettings({ thickness_nm: 100, thicknessError_nm: 3, thicknessRange: 0.2 })).toThrow(/^fit\.thicknessRange: is not used beside a measured thickness .*remove one of the two$/);
    expect(parseFitSettings({ thickness_nm: 100, thicknessRange: 0.2 }).thicknessRange).toBe(0.2);
    expect(() => parseMicrographSettings({ g200: { wError: 0.1 } }, ['g200'])).toThrow(/micrographs\.g200\.wError: needs the measured "w"/);
    expect(parseFitSettings(undefined)).toEqual(DEFAULT_FIT);
    // a measured thickness thinner than the defect's depth (40 nm here) gave an inverted depth range and a defect below the foil
    expect(() => model(undefined, { thickness_nm: 30, thicknessError_nm: 1 })).toThrow(InputError);
    expect(() => model(undefined, { thickness_nm: 30, thicknessError_nm: 1 })).toThrow(/^fit\.thickness_nm: the measured thickness 30 nm \(at most 32 nm .*\) leaves the depth 40 nm of the defect's point below the foil; /);
    const ok = Object.fromEntries(model(undefined, { thickness_nm: 38, thicknessError_nm: 2 }).parameters.map((x) => [x.name, x]));
    expect(ok.depth.lo).toBeLessThan(ok.depth.hi);
  });
  it('a measured thickness whose range leaves out the stated foil thickness (80 nm) is warned about, naming both fields', () => {
    const w = (fit: unknown) => fitWarnings(sc, parseFitSettings(fit));
    expect(w(undefined)).toEqual([]);
    // ranges worked out by hand: 84 +- 2 x 3 = 78-90 holds 80; 84 +- 2 x 1 = 82-86 does not
    expect(w({ thickness_nm: 84, thicknessError_nm: 3 })).toEqual([]);
    const far = w({ thickness_nm: 84, thicknessError_nm: 1 });
    expect(far).toHaveLength(1);
    expect(far[0]).toMatch(/^fit\.thickness_nm: the measured foil thickness 84 \+- 1 nm is far from the scenario's foil\.thickness_nm 80 nm \(outside 82-86 nm, 2 standard errors of it\); .*check both/);
    // without an error: +- 15 % of the measured value (default fit.thicknessRange): 90 -> 76.5-103.5 holds 80; 100 -> 85-115 does not
    expect(w({ thickness_nm: 90 })).toEqual([]);
    expect(w({ thickness_nm: 100 })[0]).toMatch(/\(outside 85-115 nm, the range fit\.thicknessRange gives it\)/);
    // a thickness in Angstrom (800 for 80 nm)
    expect(w({ thickness_nm: 800, thicknessError_nm: 20 })[0]).toMatch(/measured foil thickness 800 \+- 20 nm .*a unit slip\?/);
    expect(w({ thickness_nm: 80, thicknessRange: 0 })).toEqual([]);
    expect(w({ thickness_nm: 81, thicknessRange: 0 })[0]).toMatch(/\(which is used exactly \(fit\.thicknessRange 0\)\)/);
  });
});
