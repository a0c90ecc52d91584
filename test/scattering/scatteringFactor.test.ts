import { describe, expect, it } from 'vitest';
import {
  atomicNumber,
  electronScatteringFactor_A,
  scatteringTableHeader,
  xrayScatteringFactor,
} from '../../src/scattering/scatteringFactor.js';
import { InputError } from '../../src/errors.js';

// Mott-Bethe formula: fe(s) = (m0 e^2 / (8 pi eps0 h^2)) (Z - fx(s)) / s^2 = (Z - fx(s)) / (8 pi^2 a0 s^2),
// a0 the Bohr radius, CODATA 2018: 0.529177210903 Angstrom (NIST). Gives the 0.023934 of physics.md.
const BOHR_A = 0.529177210903;
const MOTT_BETHE_A = 1 / (8 * Math.PI * Math.PI * BOHR_A);

function mottBethe_A(element: string, s: number): number {
  return (MOTT_BETHE_A * (atomicNumber(element) - xrayScatteringFactor(element, s))) / (s * s);
}

describe('electron scattering factors (IT Vol. C Table 4.3.2.2, Peng et al. 1996)', () => {
  it('Mott-Bethe constant is 0.023934 A (physics.md)', () => {
    expect(MOTT_BETHE_A).toBeCloseTo(0.023934, 6);
  });

  it.each(['Al', 'Cu', 'Si', 'Fe', 'Au', 'Mg', 'Ni', 'Ga', 'As', 'O'])(
    '%s agrees with Mott-Bethe from the IT Vol. C Table 6.1.1.4 X-ray fits within 3 % for 0.1 <= s <= 1.5 per A',
    (el) => {
      // two independent fits of two different quantities; the brief's tolerance for this check is 3 %
      for (let s = 0.1; s <= 1.5 + 1e-9; s += 0.02) {
        const fe = electronScatteringFactor_A(el, s);
        const mb = mottBethe_A(el, s);
        expect(Math.abs(fe / mb - 1), `${el} s=${s.toFixed(2)}`).toBeLessThan(0.03);
      }
    },
  );

  it('Cu agrees with Mott-Bethe within 1 % for 0.1 <= s <= 1 per A (physics.md, computed from the two tables)', () => {
    for (let s = 0.1; s <= 1 + 1e-9; s += 0.01) {
      expect(Math.abs(electronScatteringFactor_A('Cu', s) / mottBethe_A('Cu', s) - 1)).toBeLessThan(0.01);
    }
  });

  it('fe(0) = sum of a_i: Cu 5.5991 A (sum of the Table 4.3.2.2 a_i for Cu: 0.4314+1.3208+1.5236+1.4671+0.8562)', () => {
    expect(electronScatteringFactor_A('Cu', 0)).toBeCloseTo(0.4314 + 1.3208 + 1.5236 + 1.4671 + 0.8562, 12);
  });

  it('fx(0) ~ Z for neutral atoms (the X-ray factor at s = 0 counts the electrons; fits within 0.5 %)', () => {
    for (const el of ['C', 'Al', 'Si', 'Fe', 'Cu', 'Au']) {
      expect(Math.abs(xrayScatteringFactor(el, 0) / atomicNumber(el) - 1)).toBeLessThan(0.005);
    }
  });

  it('decreases monotonically and stays positive out to s = 6 per A (beyond the fitted 2 per A it is still evaluated)', () => {
    for (const el of ['H', 'Al', 'Cu', 'Au', 'U']) {
      let prev = Infinity;
      for (let s = 0; s <= 6; s += 0.05) {
        const f = electronScatteringFactor_A(el, s);
        expect(f).toBeGreaterThan(0);
        expect(f).toBeLessThanOrEqual(prev);
        prev = f;
      }
    }
  });

  it('accepts symbols in any case and refuses unknown elements with an InputError', () => {
    expect(electronScatteringFactor_A('cu', 0.3)).toBe(electronScatteringFactor_A('Cu', 0.3));
    expect(atomicNumber('AU')).toBe(79);
    expect(atomicNumber('Cf')).toBe(98);
    expect(() => electronScatteringFactor_A('Xx', 0.2)).toThrow(InputError);
    expect(() => electronScatteringFactor_A('Es', 0.2)).toThrow(/Z = 1\.\.98/); // Z = 99 is not in the table
    expect(() => xrayScatteringFactor('', 0.2)).toThrow(InputError);
    expect(() => electronScatteringFactor_A('Cu', Number.NaN)).toThrow(RangeError);
  });

  it('the data file header names the tables, units and the writer script', () => {
    const hdr = scatteringTableHeader();
    expect(hdr.electron.source).toMatch(/Table 4\.3\.2\.2/);
    expect(hdr.electron.source).toMatch(/Peng/);
    expect(hdr.xray.source).toMatch(/Table 6\.1\.1\.4/);
    expect(hdr.electron.units).toMatch(/Angstrom/);
    expect(hdr.exportedFrom).toMatch(/^gemmi \d+\.\d+/);
    expect(hdr.writtenBy).toBe('scripts/export_scattering_factors.py');
  });
});
