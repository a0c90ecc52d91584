/**
 * Lattice geometry against hand-worked textbook values and against
 * Debian's python3-gemmi (gemmi.UnitCell: calculate_1_d2, volume,
 * metric_tensor), run from this test through /usr/bin/python3.
 */
import { describe, expect, it } from 'vitest';
import { type Mat3, type Vec3, mulMM } from '../../src/math/vec3.js';
import {
  angleBetweenDirections,
  angleBetweenPlanes,
  cellVolume_nm3,
  dSpacing_nm,
  directMetric,
  directionToCartesian,
  planeNormalToCartesian as planeCart,
  makeLattice,
  reciprocalMetric,
} from '../../src/crystal/lattice.js';
import { directionFromFour, directionToFour, planeFromFour, planeToFour } from '../../src/crystal/millerBravais.js';
import { getMaterial } from '../../src/crystal/materials.js';
import { lazyPythonJson, needPython } from '../python.js';

const DEG = 180 / Math.PI;
const cos = (a: Vec3, b: Vec3) => (a[0] * b[0] + a[1] * b[1] + a[2] * b[2]) / (Math.hypot(...a) * Math.hypot(...b));

describe('cubic interplanar angles', () => {
  const cu = getMaterial('Cu').lattice;
  it('(111)^(100) = arccos(1/sqrt 3) = 54.7356 deg', () => {
    // standard table of interplanar angles in cubic crystals (Cullity & Stock, Elements of X-ray Diffraction, appendix; from memory)
    expect(angleBetweenPlanes(cu, [1, 1, 1], [1, 0, 0]) * DEG).toBeCloseTo(54.7356, 4);
  });
  it('(111)^(110) = arccos(sqrt(2/3)) = 35.2644 deg', () => {
    // same table: (111)^(110) = 35.26 deg; exact value arccos(2/sqrt 6)
    expect(angleBetweenPlanes(cu, [1, 1, 1], [1, 1, 0]) * DEG).toBeCloseTo(35.2644, 4);
  });
  it('(100)^(110) = 45 deg and (111)^(11-1) = 70.5288 deg', () => {
    // same table: 45.00 and 70.53 deg (arccos(1/3))
    expect(angleBetweenPlanes(cu, [1, 0, 0], [1, 1, 0]) * DEG).toBeCloseTo(45, 10);
    expect(angleBetweenPlanes(cu, [1, 1, 1], [1, 1, -1]) * DEG).toBeCloseTo(70.5288, 4);
  });
  it('in a cubic crystal [hkl] is parallel to (hkl)', () => {
    // cubic metric: G = a^2 I (any textbook, e.g. Williams & Carter 2009 ch. 18)
    expect(angleBetweenDirections(cu, [1, 2, 3], [1, 2, 3])).toBeCloseTo(0, 7);
    expect(dSpacing_nm(cu, [1, 1, 1])).toBeCloseTo(0.36149 / Math.sqrt(3), 12);
  });
});

describe('hexagonal d-spacings (general formula, Cullity & Stock; Williams & Carter 2009)', () => {
  // 1/d^2 = 4/(3 a^2) (h^2 + h k + k^2) + l^2 / c^2
  const dHex = (a: number, c: number, h: number, k: number, l: number) => 1 / Math.sqrt((4 / (3 * a * a)) * (h * h + h * k + k * k) + (l * l) / (c * c));
  const mg = getMaterial('Mg').lattice;
  const zn = getMaterial('Zn').lattice;
  const ti = getMaterial('Ti').lattice;
  it('Mg (10-10): d = sqrt(3)/2 a', () => {
    expect(dSpacing_nm(mg, planeFromFour([1, 0, -1, 0]))).toBeCloseTo((Math.sqrt(3) / 2) * mg.a_nm, 12);
  });
  it('Mg (0002): d = c/2', () => {
    expect(dSpacing_nm(mg, planeFromFour([0, 0, 0, 2]))).toBeCloseTo(mg.c_nm / 2, 12);
  });
  it('Mg (11-20): d = a/2', () => {
    expect(dSpacing_nm(mg, planeFromFour([1, 1, -2, 0]))).toBeCloseTo(mg.a_nm / 2, 12);
  });
  it('Zn and Ti (10-11) from the general formula', () => {
    for (const l of [zn, ti]) expect(dSpacing_nm(l, [1, 0, 1])).toBeCloseTo(dHex(l.a_nm, l.c_nm, 1, 0, 1), 12);
    // Zn (10-11) with a = 0.26649, c = 0.49468 nm, by hand: 1/d^2 = 18.7741 + 4.0865 = 22.8606 nm^-2, d = 0.20915 nm
    expect(dSpacing_nm(zn, [1, 0, 1])).toBeCloseTo(0.20915, 4);
  });
  it('Mg pyramidal (10-11) lies 61.9 deg from the basal plane', () => {
    // tan(phi) = 2c/(sqrt 3 a) for c/a = 1.624 gives 61.9 deg (common textbook value, from memory)
    expect(angleBetweenPlanes(mg, [1, 0, 1], [0, 0, 1]) * DEG).toBeCloseTo(61.93, 1);
  });
  it('basal directions: [2-1-10] lies along a1 and makes 30 deg with [10-10]', () => {
    // [2-1-10] = 1/3... in 3-index [100]; <11-20> and <10-10> differ by 30 deg (Williams & Carter 2009 ch. 18)
    const u = directionFromFour([2, -1, -1, 0]);
    const cart = directionToCartesian(mg, u);
    expect(cart[0] / Math.hypot(...cart)).toBeCloseTo(1, 12);
    expect(angleBetweenDirections(mg, u, directionFromFour([1, 0, -1, 0])) * DEG).toBeCloseTo(30, 9);
    // in the basal plane a direction [uvt0] is parallel to the plane normal (uvt0) (Miller-Bravais property, same source)
    expect(angleBetweenDirections(mg, u, u)).toBeCloseTo(0, 7);
    const n = planeFromFour([2, -1, -1, 0]);
    const g = [n[0], n[1], n[2]] as Vec3;
    const cosA = cos(directionToCartesian(mg, u), planeCart(mg, g));
    expect(cosA).toBeCloseTo(1, 12);
  });
});

describe('3- and 4-index conversions (Hirth & Lothe 1982 ch. 1; Williams & Carter 2009 ch. 18)', () => {
  const close4 = (a: readonly number[], b: readonly number[]) => a.forEach((x, i) => expect(x).toBeCloseTo(b[i], 12));
  it('[100] -> 1/3[2-1-10]', () => close4(directionToFour([1, 0, 0]), [2 / 3, -1 / 3, -1 / 3, 0]));
  it('[001] -> [0001]', () => close4(directionToFour([0, 0, 1]), [0, 0, 0, 1]));
  it('[110] -> 1/3[11-20]', () => close4(directionToFour([1, 1, 0]), [1 / 3, 1 / 3, -2 / 3, 0]));
  it('(100) -> (10-10) and (111) -> (11-21)', () => {
    close4(planeToFour([1, 0, 0]), [1, 0, -1, 0]);
    close4(planeToFour([1, 1, 1]), [1, 1, -2, 1]);
  });
  it('round trips', () => {
    for (const v of [
      [1, 0, 0],
      [1, 2, 3],
      [-2, 1, 5],
      [0.5, -1.5, 2],
    ] as Vec3[]) {
      close4(directionFromFour(directionToFour(v)), v);
      close4(planeFromFour(planeToFour(v)), v);
    }
  });
  it('a 4-index set with t != -(u+v) is refused', () => {
    expect(() => directionFromFour([1, 1, 1, 0])).toThrow(RangeError);
    expect(() => planeFromFour([1, 0, 0, 0])).toThrow(RangeError);
  });
  it('the 4-index direction has the same Cartesian length (a for 1/3<11-20>)', () => {
    const mg = getMaterial('Mg').lattice;
    const v = directionFromFour([1 / 3, 1 / 3, -2 / 3, 0]);
    expect(Math.hypot(...directionToCartesian(mg, v))).toBeCloseTo(mg.a_nm, 12);
  });
});

describe('metric tensors and cell volumes', () => {
  const isIdentity = (m: Mat3) => m.forEach((row, i) => row.forEach((v, j) => expect(v).toBeCloseTo(i === j ? 1 : 0, 12)));
  const lattices = ['Al', 'alpha-Fe', 'Si', 'Mg', 'Zn', 'Ti', 'Co'].map((n) => getMaterial(n).lattice);
  it('G G* = I (reciprocal metric is the inverse of the direct metric)', () => {
    for (const l of lattices) isIdentity(mulMM(directMetric(l), reciprocalMetric(l)));
  });
  it('cubic V = a^3, hexagonal V = (sqrt 3 / 2) a^2 c', () => {
    const al = getMaterial('Al').lattice;
    expect(cellVolume_nm3(al)).toBeCloseTo(0.40495 ** 3, 14);
    const mg = getMaterial('Mg').lattice;
    expect(cellVolume_nm3(mg)).toBeCloseTo((Math.sqrt(3) / 2) * mg.a_nm * mg.a_nm * mg.c_nm, 14);
    // Mg by hand: 0.866025 * 0.32094^2 * 0.52108 = 0.046482 nm^3
    expect(cellVolume_nm3(mg)).toBeCloseTo(0.046482, 5);
  });
  it('hexagonal direct metric: G11 = a^2, G12 = -a^2/2, G33 = c^2', () => {
    const mg = getMaterial('Mg').lattice;
    const G = directMetric(mg);
    expect(G[0][0]).toBeCloseTo(mg.a_nm ** 2, 14);
    expect(G[0][1]).toBeCloseTo(-(mg.a_nm ** 2) / 2, 14);
    expect(G[2][2]).toBeCloseTo(mg.c_nm ** 2, 14);
    expect(G[0][2]).toBeCloseTo(0, 14);
  });
});

describe('cross-check with python3-gemmi UnitCell', () => {
  const names = ['Al', 'Cu', 'alpha-Fe', 'Si', 'Mg', 'Ti', 'Zn', 'Zr', 'Co'];
  const hkls: Vec3[] = [
    [1, 0, 0],
    [1, 1, 0],
    [1, 1, 1],
    [2, 0, 0],
    [1, 0, 1],
    [1, 1, 2],
    [2, -1, 3],
    [0, 0, 2],
    [3, 1, -2],
  ];
  const cells = names.map((n) => {
    const l = getMaterial(n).lattice;
    return [l.a_nm, l.b_nm, l.c_nm, l.alpha_deg, l.beta_deg, l.gamma_deg];
  });
  // For each cell: volume, direct metric (gemmi order u11 u22 u33 u12 u13 u23), 1/d^2 of each hkl and of each sum g+h
  const py = needPython('gemmi');
  const ref = lazyPythonJson<{ volume: number; metric: number[]; inv_d2: number[]; inv_d2_sum: number[][] }[]>(
    `
import json, sys, gemmi
inp = json.load(sys.stdin)
out = []
for p in inp['cells']:
    c = gemmi.UnitCell(*p)
    m = c.metric_tensor()
    out.append({'volume': c.volume, 'metric': [m.u11, m.u22, m.u33, m.u12, m.u13, m.u23],
                'inv_d2': [c.calculate_1_d2(h) for h in inp['hkls']],
                'inv_d2_sum': [[c.calculate_1_d2([a[0]+b[0], a[1]+b[1], a[2]+b[2]]) if any(a[i]+b[i] for i in range(3)) else 0.0
                                for b in inp['hkls']] for a in inp['hkls']]})
print(json.dumps(out))
`,
    { cells, hkls },
  );

  it('d-spacings, cell volumes and direct metric agree with gemmi to 1e-10 relative', (ctx) => {
    py.require(ctx);
    const r = ref();
    names.forEach((n, i) => {
      const l = getMaterial(n).lattice;
      expect(cellVolume_nm3(l)).toBeCloseTo(r[i].volume, 12);
      const G = directMetric(l);
      const mine = [G[0][0], G[1][1], G[2][2], G[0][1], G[0][2], G[1][2]];
      mine.forEach((v, k) => expect(v).toBeCloseTo(r[i].metric[k], 12));
      hkls.forEach((h, k) => expect(dSpacing_nm(l, h) ** -2 / r[i].inv_d2[k]).toBeCloseTo(1, 10));
    });
  });

  it('interplanar angles agree with gemmi (g.h from |g+h|^2 - |g|^2 - |h|^2)', (ctx) => {
    py.require(ctx);
    const r = ref();
    names.forEach((n, i) => {
      const l = getMaterial(n).lattice;
      hkls.forEach((g, a) =>
        hkls.forEach((h, b) => {
          if (r[i].inv_d2_sum[a][b] === 0) return;
          const gh = (r[i].inv_d2_sum[a][b] - r[i].inv_d2[a] - r[i].inv_d2[b]) / 2;
          const cos = gh / Math.sqrt(r[i].inv_d2[a] * r[i].inv_d2[b]);
          expect(Math.cos(angleBetweenPlanes(l, g, h))).toBeCloseTo(Math.max(-1, Math.min(1, cos)), 9);
        }),
      );
    });
  });
});
