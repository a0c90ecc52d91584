/**
 * Structure templates: site sets checked against the space-group expansion
 * of python3-gemmi (gemmi.SpaceGroup operations applied to the Wyckoff
 * positions of International Tables Vol. A) and against the kinematic
 * extinction rules of each structure (Cullity & Stock, Elements of X-ray
 * Diffraction, ch. 4; from memory, exact values follow from the positions).
 */
import { describe, expect, it } from 'vitest';
import type { Vec3 } from '../../src/math/vec3.js';
import type { Site } from '../../src/crystal/material.js';
import { STRUCTURE_LABELS, type StructureLabel, isStructureLabel, structureSites, structureTemplate } from '../../src/crystal/structures.js';
import { lazyPythonJson, needPython } from '../python.js';

const X = 'X';
const Y = 'Y';
const sitesOf = (label: StructureLabel): Site[] => {
  const n = structureTemplate(label).roles.length;
  return structureSites(label, n === 1 ? [X] : [X, Y], { X: 0.5, Y: 0.7 });
};

/** Kinematic structure factor with scattering factor fX, fY per element (no Debye-Waller). */
function structureFactor(sites: readonly Site[], hkl: Vec3, f: Record<string, number>): { re: number; im: number } {
  let re = 0;
  let im = 0;
  for (const s of sites) {
    const ph = 2 * Math.PI * (hkl[0] * s.position[0] + hkl[1] * s.position[1] + hkl[2] * s.position[2]);
    re += f[s.element] * Math.cos(ph);
    im += f[s.element] * Math.sin(ph);
  }
  return { re, im };
}
const absF = (sites: readonly Site[], hkl: Vec3, f = { X: 1, Y: 1 }) => Math.hypot(...Object.values(structureFactor(sites, hkl, f)));

describe('template bookkeeping', () => {
  it('eight templates with the expected crystal systems and site counts', () => {
    expect([...STRUCTURE_LABELS].sort()).toEqual(['B2', 'L1_2', 'bcc', 'diamond', 'fcc', 'hcp', 'rocksalt', 'zincblende']);
    const counts: Record<StructureLabel, number> = { fcc: 4, bcc: 2, diamond: 8, zincblende: 8, hcp: 2, B2: 2, L1_2: 4, rocksalt: 8 };
    for (const l of STRUCTURE_LABELS) {
      expect(sitesOf(l).length).toBe(counts[l]);
      expect(structureTemplate(l).system).toBe(l === 'hcp' ? 'hexagonal' : 'cubic');
    }
    expect(isStructureLabel('fcc')).toBe(true);
    expect(isStructureLabel('FCC')).toBe(false);
    expect(isStructureLabel('toString')).toBe(false);
  });
  it('the stated settings', () => {
    const pos = (l: StructureLabel, el: string) => sitesOf(l).filter((s) => s.element === el).map((s) => [...s.position]);
    expect(pos('hcp', X)).toEqual([
      [1 / 3, 2 / 3, 0.25],
      [2 / 3, 1 / 3, 0.75],
    ]);
    expect(pos('zincblende', Y)).toContainEqual([0.25, 0.25, 0.25]);
    expect(pos('zincblende', X)).toContainEqual([0, 0, 0]);
    expect(pos('diamond', X)).toContainEqual([0.25, 0.25, 0.25]);
    expect(pos('rocksalt', Y)).toContainEqual([0.5, 0, 0]);
    expect(pos('L1_2', Y)).toEqual([[0, 0, 0]]);
    expect(pos('L1_2', X)).toHaveLength(3);
    expect(pos('B2', X)).toEqual([[0, 0, 0]]);
    expect(pos('B2', Y)).toEqual([[0.5, 0.5, 0.5]]);
  });
  it('Debye-Waller factor and occupancy per element', () => {
    for (const s of sitesOf('rocksalt')) {
      expect(s.occupancy).toBe(1);
      expect(s.debyeWaller_A2).toBe(s.element === X ? 0.5 : 0.7);
    }
  });
  it('a wrong element count or a missing B is refused', () => {
    expect(() => structureSites('fcc', ['Cu', 'Ni'], { Cu: 1, Ni: 1 })).toThrow(RangeError);
    expect(() => structureSites('rocksalt', ['Mg', 'O'], { Mg: 1 })).toThrow(/Debye-Waller/);
  });
});

describe('extinction rules (Cullity & Stock ch. 4; F for unit scattering factors)', () => {
  it('fcc: F = 4 for unmixed hkl, 0 for mixed', () => {
    const s = sitesOf('fcc');
    expect(absF(s, [1, 1, 1])).toBeCloseTo(4, 12);
    expect(absF(s, [2, 0, 0])).toBeCloseTo(4, 12);
    expect(absF(s, [1, 0, 0])).toBeCloseTo(0, 12);
    expect(absF(s, [1, 1, 0])).toBeCloseTo(0, 12);
  });
  it('bcc: F = 2 for h+k+l even, 0 for odd', () => {
    const s = sitesOf('bcc');
    expect(absF(s, [1, 1, 0])).toBeCloseTo(2, 12);
    expect(absF(s, [1, 0, 0])).toBeCloseTo(0, 12);
    expect(absF(s, [1, 1, 1])).toBeCloseTo(0, 12);
  });
  it('diamond: |F(111)| = 4 sqrt 2, F(220) = 8, F(200) = F(222) = 0', () => {
    const s = sitesOf('diamond');
    expect(absF(s, [1, 1, 1])).toBeCloseTo(4 * Math.SQRT2, 12);
    expect(absF(s, [2, 2, 0])).toBeCloseTo(8, 12);
    expect(absF(s, [2, 0, 0])).toBeCloseTo(0, 12);
    expect(absF(s, [2, 2, 2])).toBeCloseTo(0, 12);
  });
  it('zincblende: F(200) = 4(fc - fa), F(220) = 4(fc + fa), F(111) = 4(fc - i fa)', () => {
    const s = sitesOf('zincblende');
    const f = { X: 3, Y: 2 };
    expect(structureFactor(s, [2, 0, 0], f).re).toBeCloseTo(4 * (3 - 2), 12);
    expect(structureFactor(s, [2, 2, 0], f).re).toBeCloseTo(4 * (3 + 2), 12);
    const F111 = structureFactor(s, [1, 1, 1], f);
    expect(F111.re).toBeCloseTo(12, 12);
    expect(F111.im).toBeCloseTo(-8, 12); // phase exp(2 pi i 3/4) = -i
  });
  it('rocksalt: all even 4(fc + fa), all odd 4(fc - fa), mixed 0', () => {
    const s = sitesOf('rocksalt');
    const f = { X: 3, Y: 2 };
    expect(structureFactor(s, [2, 0, 0], f).re).toBeCloseTo(20, 12);
    expect(structureFactor(s, [1, 1, 1], f).re).toBeCloseTo(4, 12);
    expect(absF(s, [1, 1, 0], f)).toBeCloseTo(0, 12);
  });
  it('B2: fundamental fA + fB, superlattice fA - fB', () => {
    const s = sitesOf('B2');
    const f = { X: 3, Y: 2 };
    expect(structureFactor(s, [1, 1, 0], f).re).toBeCloseTo(5, 12);
    expect(structureFactor(s, [1, 0, 0], f).re).toBeCloseTo(1, 12);
  });
  it('L1_2 (A3B): fundamental fB + 3 fA, superlattice fB - fA', () => {
    const s = sitesOf('L1_2'); // X = A on the face centres, Y = B on the corner
    const f = { X: 3, Y: 2 };
    expect(structureFactor(s, [1, 1, 1], f).re).toBeCloseTo(2 + 9, 12);
    expect(structureFactor(s, [1, 0, 0], f).re).toBeCloseTo(2 - 3, 12);
    expect(structureFactor(s, [1, 1, 0], f).re).toBeCloseTo(2 - 3, 12);
  });
  it('hcp: |F(0001)| = 0, |F(0002)| = 2, |F(10-10)| = 1, |F(10-11)| = sqrt 3', () => {
    // |F|^2: h+2k = 3n, l odd -> 0; h+2k = 3n, l even -> 4; h+2k = 3n+-1, l even -> 1; l odd -> 3
    const s = sitesOf('hcp');
    expect(absF(s, [0, 0, 1])).toBeCloseTo(0, 12);
    expect(absF(s, [0, 0, 2])).toBeCloseTo(2, 12);
    expect(absF(s, [1, 0, 0])).toBeCloseTo(1, 12);
    expect(absF(s, [1, 0, 1])).toBeCloseTo(Math.sqrt(3), 12);
  });
});

describe('sites equal the gemmi space-group expansion of the Wyckoff positions', () => {
  // label -> [space group (International Tables Vol. A, origin choice 1 for Fd-3m), [element, x, y, z] of one site per sublattice]
  const cases: Record<StructureLabel, [string, [string, number, number, number][]]> = {
    fcc: ['F m -3 m', [[X, 0, 0, 0]]],
    bcc: ['I m -3 m', [[X, 0, 0, 0]]],
    diamond: ['F d -3 m:1', [[X, 0, 0, 0]]],
    zincblende: [
      'F -4 3 m',
      [
        [X, 0, 0, 0],
        [Y, 0.25, 0.25, 0.25],
      ],
    ],
    hcp: ['P 63/m m c', [[X, 1 / 3, 2 / 3, 0.25]]],
    B2: [
      'P m -3 m',
      [
        [X, 0, 0, 0],
        [Y, 0.5, 0.5, 0.5],
      ],
    ],
    L1_2: [
      'P m -3 m',
      [
        [Y, 0, 0, 0],
        [X, 0, 0.5, 0.5],
      ],
    ],
    rocksalt: [
      'F m -3 m',
      [
        [X, 0, 0, 0],
        [Y, 0.5, 0.5, 0.5], // Wyckoff 4b; the template starts the anion sublattice at 1/2,0,0 (same set)
      ],
    ],
  };
  const py = needPython('gemmi');
  const ref = lazyPythonJson<Record<string, [string, number, number, number][]>>(
    `
import json, sys, gemmi
out = {}
for label, (sg, atoms) in json.load(sys.stdin).items():
    ops = gemmi.SpaceGroup(sg).operations()
    seen = []
    for el, x, y, z in atoms:
        for op in ops:
            p = [round(v % 1.0, 9) % 1.0 for v in op.apply_to_xyz([x, y, z])]
            if [el] + p not in seen:
                seen.append([el] + p)
    out[label] = seen
print(json.dumps(out))
`,
    cases,
  );
  for (const label of Object.keys(cases) as StructureLabel[]) {
    it(label, (ctx) => {
      py.require(ctx);
      const r = ref();
      const key = (e: string, p: readonly number[]) => `${e} ${p.map((v) => (Math.round(v * 1e6) / 1e6) % 1).join(' ')}`;
      const mine = sitesOf(label)
        .map((s) => key(s.element, s.position))
        .sort();
      const theirs = r[label].map(([e, ...p]) => key(e, p)).sort();
      expect(mine).toEqual(theirs);
    });
  }
});
