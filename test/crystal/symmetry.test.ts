/**
 * Point-group operations and families of equivalent directions and planes.
 * Counts are the multiplicities of International Tables Vol. A (general and
 * special forms of m-3m and 6/mmm); the operations are compared with the
 * rotation parts of python3-gemmi's space-group operations (Pm-3m, P6/mmm).
 */
import { describe, expect, it } from 'vitest';
import { type Mat3, type Vec3, det, mulMM, transpose } from '../../src/math/vec3.js';
import { dSpacing_nm, directionToCartesian } from '../../src/crystal/lattice.js';
import { getMaterial } from '../../src/crystal/materials.js';
import {
  expandFamily,
  latticeOperations,
  parseFamily,
  pointGroupCartesian,
  properRotationsCartesian,
} from '../../src/crystal/symmetry.js';
import { InputError } from '../../src/errors.js';
import { lazyPythonJson, needPython } from '../python.js';

const cu = getMaterial('Cu');
const mg = getMaterial('Mg');
const key = (m: Mat3) => m.map((r) => r.map((v) => Math.round(v * 1e9) / 1e9 + 0).join(',')).join(';');

describe('point groups', () => {
  for (const [system, n] of [
    ['cubic', 48],
    ['hexagonal', 24],
  ] as const) {
    it(`${system}: ${n} distinct orthogonal operations, identity first, closed under products, half proper`, () => {
      const ops = pointGroupCartesian(system);
      expect(ops).toHaveLength(n);
      expect(key(ops[0])).toBe(key([[1, 0, 0], [0, 1, 0], [0, 0, 1]])); // prettier-ignore
      const keys = new Set(ops.map(key));
      expect(keys.size).toBe(n);
      for (const a of ops) {
        expect(key(mulMM(a, transpose(a)))).toBe(key(ops[0]));
        for (const b of ops) expect(keys.has(key(mulMM(a, b)))).toBe(true);
      }
      expect(properRotationsCartesian(system)).toHaveLength(n / 2);
      expect(ops.filter((m) => Math.abs(det(m) + 1) < 1e-12)).toHaveLength(n / 2);
    });
  }
  it('hexagonal operations are integer matrices in lattice coordinates, for directions and planes', () => {
    for (const kind of ['direction', 'plane'] as const) {
      for (const W of latticeOperations(mg.lattice, kind)) for (const row of W) for (const v of row) expect(Number.isInteger(v)).toBe(true);
    }
  });
  it('plane operations are the inverse transposes of direction operations (International Tables Vol. A ch. 1.5)', () => {
    const d = latticeOperations(mg.lattice, 'direction');
    const p = latticeOperations(mg.lattice, 'plane');
    d.forEach((W, i) => expect(key(mulMM(transpose(W), p[i]))).toBe(key([[1, 0, 0], [0, 1, 0], [0, 0, 1]]))); // prettier-ignore
  });
  it('non-cubic, non-hexagonal lattices are refused with an InputError', () => {
    const tet = { lattice: { ...cu.lattice, system: 'tetragonal' as const } };
    expect(() => expandFamily(tet, [1, 0, 0], 'direction', false)).toThrow(InputError);
  });
});

describe('family sizes (multiplicities, International Tables Vol. A; signs collapsed / kept)', () => {
  const count = (text: string, m = cu) => [parseFamily(text, m, { collapseSign: true }).members.length, parseFamily(text, m).members.length];
  it('cubic 1/2<110>: 6 / 12', () => expect(count('1/2<110>')).toEqual([6, 12]));
  it('cubic <111>: 4 / 8', () => expect(count('<111>')).toEqual([4, 8]));
  it('cubic 1/6<112>: 12 / 24', () => expect(count('1/6<112>')).toEqual([12, 24]));
  it('cubic <100>: 3 / 6, {123}: 24 / 48', () => {
    expect(count('<100>')).toEqual([3, 6]);
    expect(count('{123}')).toEqual([24, 48]);
  });
  it('hexagonal 1/3<11-20>: 3 / 6', () => expect(count('1/3<11-20>', mg)).toEqual([3, 6]));
  it('hexagonal <0001>: 1 / 2', () => expect(count('<0001>', mg)).toEqual([1, 2]));
  it('hexagonal 1/3<11-23>: 6 / 12, {10-10}: 3 / 6, {10-11}: 6 / 12, {0002}: 1 / 2', () => {
    expect(count('1/3<11-23>', mg)).toEqual([6, 12]);
    expect(count('{10-10}', mg)).toEqual([3, 6]);
    expect(count('{10-11}', mg)).toEqual([6, 12]);
    expect(count('{0002}', mg)).toEqual([1, 2]);
  });
});

describe('family members', () => {
  it('1/2<110>: exact halves, given vector first, all |b| = a/sqrt 2', () => {
    const f = parseFamily('1/2<1 1 0>', cu, { collapseSign: true });
    expect(f.kind).toBe('direction');
    expect(f.representative).toEqual([0.5, 0.5, 0]);
    expect(f.members[0]).toEqual([0.5, 0.5, 0]);
    for (const b of f.members) {
      expect(b.every((x) => [0, 0.5, -0.5].includes(x))).toBe(true);
      expect(Math.hypot(...directionToCartesian(cu.lattice, b))).toBeCloseTo(cu.lattice.a_nm / Math.SQRT2, 12);
    }
    // collapsed: no two members are +- each other
    for (const a of f.members) expect(f.members.filter((b) => b.every((x, i) => x === -a[i]))).toHaveLength(0);
  });
  it('1/3<11-20> in Mg: the three basal a vectors a1 + a2, a2, a1 (3-index lattice units), length a', () => {
    const f = parseFamily('1/3<11-20>', mg, { collapseSign: true });
    const sorted = f.members.map((v) => v.join(',')).sort();
    expect(sorted).toEqual(['0,1,0', '1,0,0', '1,1,0']);
    for (const b of f.members) expect(Math.hypot(...directionToCartesian(mg.lattice, b))).toBeCloseTo(mg.lattice.a_nm, 12);
  });
  it('plane family members share the d-spacing; {10-11} in Zn', () => {
    const zn = getMaterial('Zn');
    const f = parseFamily('{10-11}', zn);
    expect(f.kind).toBe('plane');
    for (const g of f.members) expect(dSpacing_nm(zn.lattice, g)).toBeCloseTo(dSpacing_nm(zn.lattice, [1, 0, 1]), 12);
  });
  it('expandFamily keeps the given sign when collapsing and refuses a zero vector', () => {
    expect(expandFamily(cu, [-1, 0, 0], 'direction', true)[0]).toEqual([-1, 0, 0]);
    expect(() => expandFamily(cu, [0, 0, 0], 'direction', true)).toThrow(RangeError);
  });
});

describe('parseFamily errors', () => {
  it('needs <...> or {...}', () => {
    expect(() => parseFamily('[110]', cu)).toThrow(/^family: write a family with <\.\.\.> for directions or \{\.\.\.\} for planes/);
    expect(() => parseFamily('110', cu, { field: 'candidates.b' })).toThrow(/^candidates\.b: /);
  });
  it('hexagonal needs 4 indices, cubic 3', () => {
    expect(() => parseFamily('1/3<110>', mg)).toThrow(/expected 4 indices/);
    expect(() => parseFamily('<11-20>', cu)).toThrow(/expected 3 indices/);
    expect(() => parseFamily('<1120>', mg)).toThrow(/third index must equal -\(first \+ second\)/);
  });
});

describe('cross-check with python3-gemmi space-group rotations', () => {
  const py = needPython('gemmi');
  const ref = lazyPythonJson<{ cubic: number[][][]; hexagonal: number[][][]; hexPlanes: Record<string, number[][]> }>(
    `
import json, sys, gemmi
def rots(name):
    return [[[v // gemmi.Op.DEN for v in row] for row in op.rot] for op in gemmi.SpaceGroup(name).operations().sym_ops]
hexr = rots('P 6/m m m')
planes = {}
for h in json.load(sys.stdin):
    # reflections transform as row vectors: h' = h R
    eq = []
    for R in hexr:
        hp = [sum(h[i] * R[i][j] for i in range(3)) for j in range(3)]
        if hp not in eq: eq.append(hp)
    planes[','.join(map(str, h))] = eq
print(json.dumps({'cubic': rots('P m -3 m'), 'hexagonal': hexr, 'hexPlanes': planes}))
`,
    [
      [1, 0, 1],
      [1, 1, 2],
      [2, -1, 3],
    ],
  );
  it('direction operations in lattice coordinates equal the rotation parts of Pm-3m and P6/mmm', (ctx) => {
    py.require(ctx);
    const r = ref();
    for (const [m, theirs] of [
      [cu, r.cubic],
      [mg, r.hexagonal],
    ] as const) {
      const mine = latticeOperations(m.lattice, 'direction').map(key).sort();
      expect(mine).toEqual(theirs.map((R) => key(R as unknown as Mat3)).sort());
    }
  });
  it('hexagonal plane families equal gemmi equivalent reflections', (ctx) => {
    py.require(ctx);
    const r = ref();
    for (const [h, eq] of Object.entries(r.hexPlanes)) {
      const hkl = h.split(',').map(Number) as unknown as Vec3;
      const mine = expandFamily(mg, hkl, 'plane', false)
        .map((v) => v.join(','))
        .sort();
      expect(mine).toEqual(eq.map((v) => v.join(',')).sort());
    }
  });
});
