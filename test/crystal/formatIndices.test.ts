/**
 * Four-index notation in printed output. Conversions worked by hand with the
 * Miller-Bravais rules (Williams & Carter 2009, ch. 18; Hirth & Lothe 1982,
 * ch. 1): planes (hkl) -> (h k -(h+k) l); directions [UVW] -> [uvtw] with
 * u = (2U - V)/3, v = (2V - U)/3, t = -(u + v), w = W.
 */
import { describe, expect, it } from 'vitest';
import { makeLattice } from '../../src/crystal/lattice.js';
import { formatDirectionIn, formatPlaneIn, indicesWithFraction } from '../../src/crystal/formatIndices.js';

const hex = makeLattice('hexagonal', { a: 0.321, c: 0.521 });
const cubic = makeLattice('cubic', { a: 0.36 });

describe('printed indices', () => {
  it('hexagonal: the a-type Burgers vector [1 1 0] is 1/3[1 1 -2 0], [0 0 1] is [0 0 0 1], [1 0 0] is 1/3[2 -1 -1 0]', () => {
    expect(formatDirectionIn(hex, [1, 1, 0])).toBe('1/3[1 1 -2 0]');
    expect(formatDirectionIn(hex, [0, 0, 1])).toBe('[0 0 0 1]');
    expect(formatDirectionIn(hex, [1, 0, 0])).toBe('1/3[2 -1 -1 0]');
  });
  it('hexagonal planes: (1 0 1) is (1 0 -1 1), (1 -1 0) is (1 -1 0 0)', () => {
    expect(formatPlaneIn(hex, [1, 0, 1])).toBe('(1 0 -1 1)');
    expect(formatPlaneIn(hex, [1, -1, 0])).toBe('(1 -1 0 0)');
  });
  it('cubic keeps three indices and a common fraction', () => {
    expect(formatDirectionIn(cubic, [0.5, 0.5, 0])).toBe('1/2[1 1 0]');
    expect(formatDirectionIn(cubic, [1 / 6, 1 / 6, -1 / 3])).toBe('1/6[1 1 -2]');
    expect(formatPlaneIn(cubic, [2, 0, 0])).toBe('(2 0 0)');
    expect(indicesWithFraction([0.123, 1, 0])).toBe('[0.123 1 0]');
  });
  it('one writer of lattice vectors: simple fractions, no negative zero, decimals (6 places) when no small denominator fits', () => {
    expect(indicesWithFraction([0.5, -0.5, 0])).toBe('1/2[1 -1 0]');
    expect(indicesWithFraction([1 / 6, 1 / 6, -1 / 3])).toBe('1/6[1 1 -2]');
    expect(indicesWithFraction([1, -0, 0])).toBe('[1 0 0]');
    expect(indicesWithFraction([-0.5, -0, 0.5])).toBe('1/2[-1 0 1]');
    expect(indicesWithFraction([0.689898, -0.689898, 1])).toBe('[0.689898 -0.689898 1]');
    expect(indicesWithFraction([1 / 3, 1 / 3, 1 / 3], '(', ')')).toBe('1/3(1 1 1)');
  });
});

describe('candidate labels in the crystal notation', () => {
  it('the a-type family of a hexagonal metal is labelled with four indices (1/3<1 1 -2 0>, Williams & Carter 2009 ch. 18)', async () => {
    const { parseScenario } = await import('../../src/scenario/parse.js');
    const sc = parseScenario({
      name: 'hcp labels', material: 'Mg', kV: 200, foil: { thickness_nm: 100, normal: [0, 0, 0, 1] }, beam: [0, 0, 0, 1],
      image: { width_px: 8, height_px: 8, pixel_nm: 1 }, conditions: [{ id: 'g', g: [1, -1, 0, 0], w: 0.5 }],
      candidates: ['1/3<11-20>'],
    });
    const labels = sc.candidates.map((c) => c.label).sort();
    expect(labels).toHaveLength(3);
    for (const l of labels) expect(l).toMatch(/^b = 1\/3\[-?\d -?\d -?\d 0\]$/);
    expect(labels).toContain('b = 1/3[1 1 -2 0]');
  });
  it('identification candidates of a hexagonal loop and fault are written with four indices too (as line defects are)', async () => {
    const { parseScenario } = await import('../../src/scenario/parse.js');
    const { identificationCandidates } = await import('../../src/analysis/candidates.js');
    const hcp = (defects: unknown[]) =>
      parseScenario({
        name: 'hcp candidates', material: 'Mg', kV: 200, foil: { thickness_nm: 100, normal: [0, 0, 0, 1] }, beam: [0, 0, 0, 1],
        image: { width_px: 8, height_px: 8, pixel_nm: 1 }, conditions: [{ id: 'g', g: [1, -1, 0, 0], w: 0.5 }],
        defects, candidates: ['1/3<11-20>'],
      });
    // a loop on (1 1 -2 0): b = 1/3[1 1 -2 0] is along n (vacancy; -b interstitial), the other two a-vectors lie 60 degrees
    // from n (b.n = |b| / 2 > 0: mixed loops, vacancy for + and interstitial for -); none lies in the plane
    const loops = identificationCandidates(hcp([{ type: 'loop', b: '1/3[1 1 -2 0]', normal: [1, 1, -2, 0], centre_nm: [0, 0, 50], radius_nm: 10 }]));
    expect(loops).toHaveLength(6);
    for (const c of loops) expect(c.label).toMatch(/^b = 1\/3\[-?\d -?\d -?\d 0\] \((vacancy|interstitial)\)$/);
    expect(loops.map((c) => c.label)).toContain('b = 1/3[1 1 -2 0] (vacancy)');
    expect(loops.map((c) => c.label)).toContain('b = 1/3[-1 -1 2 0] (interstitial)');
    // a basal fault with R = 1/6[2 -2 0 3] (invented example): the given vector and its negative
    const faults = identificationCandidates(hcp([{ type: 'fault', plane: [0, 0, 0, 1], vector: '1/6[2 -2 0 3]', point_nm: [0, 0, 50] }]));
    expect(faults.map((c) => c.label)).toEqual(['R = 1/6[2 -2 0 3]', 'R = 1/6[-2 2 0 -3]']);
  });
});
