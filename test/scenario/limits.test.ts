/**
 * Refusals that must happen in validation, before any file is written
 * (issue: pixel_nm 0.001, a 300-character condition id and a stacking-fault
 * energy of 0 passed the parser and failed during render), and numbers that
 * are not numbers in index strings (1e400, 1e-320, 1000000).
 */
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { parseIndices, parseVectorWithFraction } from '../../src/crystal/indices.js';

const BASE = {
  name: 'limits',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 80, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  image: { width_px: 16, height_px: 16, pixel_nm: 1 },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 40] }],
};

function refusal(patch: (s: any) => void): string {
  const s = JSON.parse(JSON.stringify(BASE));
  patch(s);
  try {
    parseScenario(s);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    const m = (e as Error).message;
    expect(m).not.toMatch(/\n/);
    expect(m.length).toBeLessThan(400);
    return m;
  }
  throw new Error('accepted');
}

describe('scenario limits checked by the parser', () => {
  it('the base scenario is accepted', () => {
    expect(parseScenario(BASE).conditions[0].id).toBe('g200');
  });
  it.each([
    ['pixel_nm 0.001', (s: any) => (s.image.pixel_nm = 0.001), 'image.pixel_nm'],
    ['a 300-character condition id', (s: any) => (s.conditions[0].id = 'x'.repeat(300)), 'conditions[0].id: is 300 characters long; give at most 64'],
    ['a 100 kB name', (s: any) => (s.name = 'n'.repeat(100_000)), 'name: is 100000 characters long'],
    ['a 5000-character label', (s: any) => (s.defects[0].label = 'L'.repeat(5000)), 'defects[0].label: is 5000 characters long'],
    ['1000 defects', (s: any) => (s.defects = Array.from({ length: 1000 }, () => s.defects[0])), 'defects: holds 1000 defects; give at most 100'],
    ['30 conditions', (s: any) => (s.conditions = Array.from({ length: 30 }, (_, i) => ({ id: `c${i}`, g: [2, 0, 0], w: 0.5 }))), 'conditions: holds 30 conditions'],
    [
      'stacking-fault energy 0 for a dissociated dislocation',
      (s: any) => {
        s.material = {
          name: 'sfe0', structure: 'fcc', elements: ['Cu'], lattice: { a_nm: 0.36149 }, debyeWaller_A2: { Cu: 0.55 },
          elastic: { cij_GPa: { C11: 168.4, C12: 121.4, C44: 75.4 } }, stackingFaultEnergy_mJ_per_m2: 0,
        };
        s.defects = [{ type: 'dissociated', b: '1/2[1 -1 0]', plane: [1, 1, 1], line: [1, -1, 0], point_nm: [0, 0, 40] }];
      },
      'separation_nm: is needed because the stacking-fault energy',
    ],
    [
      'a 31-beam row through 10 um',
      (s: any) => {
        s.foil.thickness_nm = 10000;
        s.conditions[0].beams = { row: 31 };
      },
      'conditions[0].beams: 31 beams through 10000 nm exceed the limit',
    ],
    ['b "[1e400 0 0]"', (s: any) => (s.defects[0].b = '[1e400 0 0]'), 'defects[0].b: the indices "[1e400 0 0]" are not all finite numbers'],
    ['b "0.5[1e308 0 0]"', (s: any) => (s.defects[0].b = '0.5[1e308 0 0]'), 'defects[0].b: the indices'],
    ['b [1e-320, 0, 0]', (s: any) => (s.defects[0].b = [1e-320, 0, 0]), 'defects[0].b: the indices'],
    ['b "[1000000 0 0]"', (s: any) => (s.defects[0].b = '[1000000 0 0]'), 'exceed 100 in magnitude'],
  ])('%s is refused', (_what, patch, part) => {
    const m = refusal(patch);
    expect(m).toContain(part);
  });
});

describe('index strings check finiteness and magnitude like arrays', () => {
  it.each(['[1e400 0 0]', '1e400,0,0', '[1000 0 0]', '[1e-9 0 0]'])('"%s" is refused', (t) => {
    expect(() => parseIndices(t, 'g', 3)).toThrow(InputError);
    expect(() => parseIndices(t.replace(/[[\]]/g, '').split(/[ ,]/).map(Number), 'g', 3)).toThrow(InputError);
  });
  it('a fraction that makes the vector too large is refused; ordinary ones pass', () => {
    expect(() => parseVectorWithFraction('90[2 0 0]', 'b')).toThrow(/exceed 100/);
    expect(parseVectorWithFraction('1/2[1 1 0]', 'b')).toEqual([0.5, 0.5, 0]);
  });
});

describe('InputError messages are one short line', () => {
  it('long quoted input is shortened, the prose between quotes is kept, line breaks become spaces', () => {
    const prose = 'are not all finite numbers; give ordinary numbers such as a longer text here';
    expect(new InputError(`b: the indices "[1e400 0 0]" ${prose} "1 -1 0".`).message).toBe(`b: the indices "[1e400 0 0]" ${prose} "1 -1 0".`);
    const m = new InputError(`name "${'x'.repeat(500)}" is\nbad`).message;
    expect(m).toBe(`name "${'x'.repeat(40)}... (500 characters)" is bad`);
    expect(new InputError('y'.repeat(5000)).message.length).toBeLessThanOrEqual(400);
  });
});

describe('render cost guard (column-defect pairs; rate measured in this project, see renderCommand.ts)', () => {
  it('warns with an estimate above 5e5 pairs and refuses above 2e7 before any work', async () => {
    const { costWarning } = await import('../../src/cli/renderCommand.js');
    const sc = parseScenario(BASE); // 16 x 16 x 1 x 1
    expect(costWarning(sc)).toBeUndefined();
    const many = { ...sc, image: { ...sc.image, width_px: 256, height_px: 256 }, defects: Array.from({ length: 10 }, () => sc.defects[0]) };
    expect(costWarning(many)).toMatch(/= 6\.6e\+5 column-defect pairs; at 2000 pairs per second \(two-beam, many lines column by column, 2 cores\) that is about 5 min/);
    const huge = { ...many, image: { ...sc.image, width_px: 1024, height_px: 1024 }, defects: Array.from({ length: 30 }, () => sc.defects[0]) };
    expect(() => costWarning(huge)).toThrow(InputError);
  });
});

describe('output folder names', () => {
  it('names that differ only in non-Latin characters get different folders; plain names stay readable', async () => {
    const { slug } = await import('../../src/cli/slug.js');
    expect(slug('two dislocations in copper')).toBe('two-dislocations-in-copper');
    expect(slug('Kupfer-Versetzung ä')).not.toBe(slug('Kupfer-Versetzung ö'));
    expect(slug('Kupfer-Versetzung ä')).toMatch(/^kupfer-versetzung-[0-9a-f]{8}$/);
    expect(slug('銅の転位')).toMatch(/^scenario-[0-9a-f]{8}$/);
    expect(slug('銅の転位')).not.toBe(slug('ニッケルの転位'));
  });
});
