import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { type Vec3, cross, dot, norm, scale, sub } from '../../src/math/vec3.js';
import { InputError } from '../../src/errors.js';
import { straightDislocation } from '../../src/elasticity/straightDislocation.js';
import { DIAGONAL_GAP, anisotropicDislocation, anisotropicLine, energyFactorMatrix } from '../../src/elasticity/anisotropicDislocation.js';
import { isotropicVoigt, stiffnessTensor, voigtStiffness } from '../../src/elasticity/stiffness.js';
import { anisotropicRibbonWidth_nm, ribbonWidth_nm } from '../../src/elasticity/dissociation.js';
import type { DisplacementField } from '../../src/elasticity/field.js';
import { fdGradient, maxAbs, maxAbsDiff, polygonIntegral, randomUnit, rng } from './helpers.js';
import { needPython, pythonJson } from '../python.js';

const numpy = needPython('numpy');
import { listMaterials } from '../../src/crystal/materials.js';
import { materialStiffness } from '../../src/elasticity/stiffness.js';
import { directionToCartesian } from '../../src/crystal/lattice.js';

// Library constants (data/materials.json, Simmons & Wang 1971; from memory there)
const CU = voigtStiffness({ C11: 168.4, C12: 121.4, C44: 75.4 }, 'cubic');
const FE = voigtStiffness({ C11: 231.4, C12: 134.7, C44: 116.4 }, 'cubic');
const ZN = voigtStiffness({ C11: 161.0, C12: 34.2, C13: 50.1, C33: 61.0, C44: 38.3 }, 'hexagonal');

const unitOf = (v: Vec3): Vec3 => scale(v, 1 / norm(v));
function perp(u: Vec3, r: () => number): Vec3 {
  const w = randomUnit(r);
  return unitOf(sub(w, scale(u, dot(w, u) / dot(u, u))));
}
function randomPoint(r: () => number, s = 6): Vec3 {
  return [s * (r() - 0.5), s * (r() - 0.5), s * (r() - 0.5)];
}
/** Distance of x from the line (P, u). */
function distance(x: Vec3, P: Vec3, u: Vec3): number {
  const d = sub(x, P);
  const e = unitOf(u);
  return norm(sub(d, scale(e, dot(d, e))));
}
const quad = (K: number[], a: Vec3, b: Vec3): number => {
  let s = 0;
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += a[i] * K[i * 3 + j] * b[j];
  return s;
};

/** Max differences of displacement, gradient and directional derivative over points. */
function fieldDiff(f1: DisplacementField, f2: DisplacementField, pts: Vec3[], g: Vec3, k: Vec3): { d: number; g: number; dir: number } {
  const a = new Float64Array(9), b = new Float64Array(9);
  const d1 = f1.directional(g, k), d2 = f2.directional(g, k);
  let md = 0, mg = 0, mdir = 0;
  for (const p of pts) {
    f1.displacement(a, p[0], p[1], p[2]);
    f2.displacement(b, p[0], p[1], p[2]);
    md = Math.max(md, maxAbsDiff(a.subarray(0, 3), b.subarray(0, 3)));
    f1.gradient(a, p[0], p[1], p[2]);
    f2.gradient(b, p[0], p[1], p[2]);
    mg = Math.max(mg, maxAbsDiff(a, b));
    mdir = Math.max(mdir, Math.abs(d1(p[0], p[1], p[2]) - d2(p[0], p[1], p[2])));
  }
  return { d: md, g: mg, dir: mdir };
}

describe('anisotropic dislocation: isotropic limit (Hirth & Lothe 1982 ch. 3 closed form, physics.md section 5)', () => {
  const r = rng(4242);
  for (let c = 0; c < 6; c++) {
    const G = 20 + 100 * r();
    const nu = 0.1 + 0.35 * r();
    const u = scale(randomUnit(r), 0.5 + r());
    const b = c === 0 ? scale(unitOf(u), 0.25) : c === 1 ? scale(perp(u, r), 0.25) : scale(randomUnit(r), 0.15 + 0.2 * r());
    const P = randomPoint(r, 2);
    const cut = c % 2 === 1 ? perp(u, r) : undefined;
    const name = c === 0 ? 'pure screw' : c === 1 ? 'pure edge with a cut' : `mixed ${c}`;
    it(`${name}: C11 - C12 = 2 C44 gives the isotropic field to 1e-9 everywhere, core included`, () => {
      const opts = { b_nm: b, line: u, point_nm: P, ...(cut ? { cutDirection: cut } : {}) };
      const iso = straightDislocation({ ...opts, poissonRatio: nu });
      const ani = anisotropicDislocation({ ...opts, stiffness_GPa: isotropicVoigt(G, nu) });
      const pts: Vec3[] = [];
      for (let i = 0; i < 200; i++) pts.push(randomPoint(r, 3));
      // points inside the modified core (rho < 2 |b|)
      const e = perp(u, r);
      for (let i = 0; i < 40; i++) {
        const rho = 2 * norm(b) * r();
        const w = cross(unitOf(u), e);
        const ang = 2 * Math.PI * r();
        pts.push([P[0] + rho * (Math.cos(ang) * e[0] + Math.sin(ang) * w[0]) + u[0] * r(), P[1] + rho * (Math.cos(ang) * e[1] + Math.sin(ang) * w[1]) + u[1] * r(), P[2] + rho * (Math.cos(ang) * e[2] + Math.sin(ang) * w[2]) + u[2] * r()]);
      }
      pts.push(P); // on the line
      const d = fieldDiff(ani, iso, pts, [1, -2, 3], unitOf([0.2, 0.3, 1]));
      expect(d.d).toBeLessThan(1e-9);
      expect(d.g).toBeLessThan(1e-9);
      expect(d.dir).toBeLessThan(1e-9);
    });
  }

  it('nearly isotropic constants (Zener ratio 1 + eps): the field converges to the isotropic one as eps -> 0, never NaN', () => {
    const G = 60, nu = 0.3;
    const base = isotropicVoigt(G, nu);
    const u: Vec3 = [1, 2, -0.7], b: Vec3 = [0.1, -0.2, 0.15], P: Vec3 = [0, 0, 0];
    const iso = straightDislocation({ b_nm: b, line: u, point_nm: P, poissonRatio: nu });
    const pts: Vec3[] = [];
    const r2 = rng(7);
    for (let i = 0; i < 60; i++) pts.push(randomPoint(r2, 4));
    let prev = Infinity;
    for (const eps of [1e-2, 1e-3, 1e-4, 1e-6, 1e-8, 1e-10, 1e-12, 1e-14]) {
      const V = base.slice();
      for (const k of [21, 28, 35]) V[k] *= 1 + eps; // C44, C55, C66
      const ani = anisotropicDislocation({ b_nm: b, line: u, point_nm: P, stiffness_GPa: V });
      const d = fieldDiff(ani, iso, pts, [1, 1, 0], [0, 0, 1]);
      const worst = Math.max(d.d, d.g, d.dir);
      expect(Number.isFinite(worst)).toBe(true);
      // first order in eps (the field is analytic in the constants), plus rounding
      expect(worst).toBeLessThan(2 * eps + 1e-12);
      if (eps <= 1e-4) expect(worst).toBeLessThanOrEqual(prev + 1e-12);
      prev = worst;
    }
  });
});

describe('anisotropic dislocation: the diagonal and the degenerate-safe (triangular) evaluation agree on both sides of the threshold', () => {
  it('Cu, alpha-Fe, Zn, random lines: forced triangular form = diagonal form to 1e-11, core included', () => {
    const r = rng(31);
    for (const V of [CU, FE, ZN]) {
      for (let i = 0; i < 4; i++) {
        const u = randomUnit(r), b = scale(randomUnit(r), 0.25), P = randomPoint(r, 1);
        const opts = { b_nm: b, line: u, point_nm: P, stiffness_GPa: V };
        expect(anisotropicLine(opts).modes.diagonal).toBe(true);
        const pts: Vec3[] = [];
        for (let k = 0; k < 40; k++) pts.push(randomPoint(r, 4));
        // and points inside the modified core (rho < 2 |b| = 0.5 nm), where the directional fast path has its own branch
        const e1 = perp(u, r), e2 = cross(unitOf(u), e1);
        for (let k = 0; k < 40; k++) {
          const rho = 0.5 * r(), ang = 2 * Math.PI * r(), s = 2 * r() - 1;
          pts.push([0, 1, 2].map((i) => P[i] + rho * (Math.cos(ang) * e1[i] + Math.sin(ang) * e2[i]) + s * u[i]) as unknown as Vec3);
        }
        const d = fieldDiff(anisotropicDislocation(opts), anisotropicDislocation({ ...opts, forceTriangular: true }), pts, [2, 0, -1], unitOf([1, 1, 3]));
        expect(Math.max(d.d, d.g, d.dir)).toBeLessThan(1e-11);
      }
    }
  });

  it('a sweep of the Zener ratio through the relative-gap threshold is continuous (steps of 1e-6 change the field by < 1e-5 |b|)', () => {
    const u: Vec3 = [1, 2, 3], b: Vec3 = [0.2, 0.05, -0.1], P: Vec3 = [0, 0, 0];
    const pts: Vec3[] = [];
    const r = rng(5);
    for (let k = 0; k < 30; k++) pts.push(randomPoint(r, 4));
    const at = (A: number) => {
      const V = voigtStiffness({ C11: 200, C12: 120, C44: (A * 80) / 2 }, 'cubic');
      const opts = { b_nm: b, line: u, point_nm: P, stiffness_GPa: V };
      return { f: anisotropicDislocation(opts), gap: anisotropicLine(opts).modes.relativeGap };
    };
    // find the Zener ratio where the gap crosses the threshold (bisection)
    let lo = 1.0, hi = 1.5;
    expect(at(lo).gap).toBeLessThan(DIAGONAL_GAP);
    expect(at(hi).gap).toBeGreaterThan(DIAGONAL_GAP);
    for (let i = 0; i < 50; i++) {
      const mid = (lo + hi) / 2;
      if (at(mid).gap < DIAGONAL_GAP) lo = mid;
      else hi = mid;
    }
    const below = at(lo - 1e-6), above = at(lo + 1e-6);
    expect(below.gap).toBeLessThan(DIAGONAL_GAP);
    expect(above.gap).toBeGreaterThan(DIAGONAL_GAP);
    const d = fieldDiff(below.f, above.f, pts, [1, 0, 0], [0, 0, 1]);
    expect(Math.max(d.d, d.g, d.dir)).toBeLessThan(1e-5 * norm(b));
  });
});

const crystals: [string, number[]][] = [
  ['Cu', CU],
  ['alpha-Fe', FE],
  ['Zn (hexagonal)', ZN],
];

describe('anisotropic dislocation: equilibrium C_ijkl u_k,lj = 0 (linear elasticity, Hirth & Lothe 1982 ch. 13) by finite differences', () => {
  for (const [name, V] of crystals) {
    it(`${name}: several lines incl. the degenerate c axis of Zn, |div sigma| < 1e-6 of |grad sigma|`, () => {
      const C = stiffnessTensor(V);
      const r = rng(name.length * 17);
      const lines: Vec3[] = [[0, 0, 1], [1, 1, 0], [1, 1, 1], [1, -2, 0.3], randomUnit(r), randomUnit(r)];
      for (const u of lines) {
        const b = scale(randomUnit(r), 0.25);
        const f = anisotropicDislocation({ b_nm: b, line: u, point_nm: [0, 0, 0], stiffness_GPa: V });
        const h = 2e-4; // central differences: truncation ~ (h/rho)^2 < 1e-7, rounding ~ 1e-12
        const gp = new Float64Array(9), gm = new Float64Array(9);
        for (let k = 0; k < 10; k++) {
          const x = randomPoint(r, 6);
          if (distance(x, [0, 0, 0], u) < 1) continue;
          // sigma_ij = C_ijkl u_k,l; d sigma_ij / d x_j by central differences of the analytic gradient
          const div = [0, 0, 0];
          let scaleG = 0;
          for (let j = 0; j < 3; j++) {
            const xp: number[] = [x[0], x[1], x[2]], xm: number[] = [x[0], x[1], x[2]];
            xp[j] += h;
            xm[j] -= h;
            f.gradient(gp, xp[0], xp[1], xp[2]);
            f.gradient(gm, xm[0], xm[1], xm[2]);
            for (let i = 0; i < 3; i++)
              for (let kk = 0; kk < 3; kk++)
                for (let l = 0; l < 3; l++) {
                  const t = (C[((i * 3 + j) * 3 + kk) * 3 + l] * (gp[kk * 3 + l] - gm[kk * 3 + l])) / (2 * h);
                  div[i] += t;
                  scaleG = Math.max(scaleG, Math.abs(t));
                }
          }
          expect(maxAbs(div)).toBeLessThan(1e-6 * scaleG);
        }
      }
    });
  }
});

describe('anisotropic dislocation: Burgers circuit (FS/RH, Hirth & Lothe 1982: closed integral of dR about u = b) and gradient', () => {
  for (const [name, V] of crystals) {
    it(`${name}: polygon circuits about random lines close to b to 1e-9, the gradient equals finite differences`, () => {
      const r = rng(name.length * 101);
      for (const u of [[0, 0, 1] as Vec3, randomUnit(r), randomUnit(r)]) {
        const b = scale(randomUnit(r), 0.2 + 0.1 * r());
        const P = randomPoint(r, 1);
        const f = anisotropicDislocation({ b_nm: b, line: u, point_nm: P, stiffness_GPa: V, cutDirection: perp(u, r) });
        const e1 = perp(u, r), e2 = cross(unitOf(u), e1);
        // a square circuit right-handed about u, off-centre, radius ~ 3 nm
        const at = (s: number, t: number): Vec3 => [P[0] + s * e1[0] + t * e2[0] + 0.3, P[1] + s * e1[1] + t * e2[1] - 0.2, P[2] + s * e1[2] + t * e2[2] + 0.1];
        const shift = (v: Vec3): Vec3 => sub(v, scale(unitOf(u), dot(sub(v, P), unitOf(u)) - 0.7)); // keep the circuit in one plane
        const verts = [at(-3, -3), at(3, -3), at(3, 3), at(-3, 3)].map(shift);
        const got = polygonIntegral(f, verts, 24, 12);
        expect(maxAbsDiff(got, b)).toBeLessThan(1e-9 * norm(b));
        const g = new Float64Array(9);
        for (let k = 0; k < 20; k++) {
          const x = randomPoint(r, 6);
          if (distance(x, P, u) < 1) continue;
          f.gradient(g, x[0], x[1], x[2]);
          expect(maxAbsDiff(g, fdGradient(f, x, 1e-5))).toBeLessThan(1e-8);
        }
      }
    });
  }
});

describe('anisotropic dislocation: energy factors against closed forms', () => {
  const cubic: [string, number, number, number][] = [
    ['Cu', 168.4, 121.4, 75.4],
    ['alpha-Fe', 231.4, 134.7, 116.4],
    ['Cr', 339.8, 58.6, 99.0],
  ];
  for (const [name, C11, C12, C44] of cubic) {
    const V = voigtStiffness({ C11, C12, C44 }, 'cubic');
    it(`${name}: screw along [001] K = C44; screw along [110] K = sqrt(C44 (C11 - C12)/2); edge along [001], b [100]: Hirth & Lothe ch. 13`, () => {
      // screw along [001]: K = C44 (Hirth & Lothe 1982 ch. 13; physics.md section 5)
      expect(quad(energyFactorMatrix(V, [0, 0, 1]), [0, 0, 1], [0, 0, 1])).toBeCloseTo(C44, 9);
      // screw along <110> (the fcc a/2<110> screw): the antiplane problem decouples (2-fold axes [001], [1-10]
      // in the plane), shear constants C44 and (C11 - C12)/2, K = sqrt(C44 (C11 - C12)/2) (Hirth & Lothe ch. 13)
      const b110 = unitOf([1, 1, 0]);
      expect(quad(energyFactorMatrix(V, [1, 1, 0]), b110, b110)).toBeCloseTo(Math.sqrt((C44 * (C11 - C12)) / 2), 9);
      // edge along [001] with b along [100] (glide plane (010)), Hirth & Lothe 1982 ch. 13 (orthotropic formula with
      // C11bar = sqrt(C11 C22) = C11 for cubic): K = (C11 + C12) sqrt(C44 (C11 - C12) / (C11 (C11 + C12 + 2 C44)))
      const want = (C11 + C12) * Math.sqrt((C44 * (C11 - C12)) / (C11 * (C11 + C12 + 2 * C44)));
      expect(quad(energyFactorMatrix(V, [0, 0, 1]), [1, 0, 0], [1, 0, 0])).toBeCloseTo(want, 9);
    });
  }
  it('Zn, line along the c axis (exactly degenerate p, transversely isotropic): screw K = C44, edge K = (C11^2 - C12^2)/(2 C11)', () => {
    // In the basal plane a hexagonal crystal is isotropic (Nye 1957) with mu = C66 = (C11 - C12)/2, lambda = C12:
    // plane strain gives K_edge = mu/(1 - nu), nu = lambda/(2 (lambda + mu)) = C12/(C11 + C12) (Hirth & Lothe ch. 3 form);
    // the antiplane shear constant is C44 in every basal direction: K_screw = C44.
    const K = energyFactorMatrix(ZN, [0, 0, 1]);
    expect(quad(K, [0, 0, 1], [0, 0, 1])).toBeCloseTo(38.3, 9);
    expect(quad(K, [1, 0, 0], [1, 0, 0])).toBeCloseTo((161 * 161 - 34.2 * 34.2) / (2 * 161), 9);
    expect(quad(K, [0, 1, 0], [0, 1, 0])).toBeCloseTo((161 * 161 - 34.2 * 34.2) / (2 * 161), 9);
    expect(Math.abs(quad(K, [1, 0, 0], [0, 0, 1]))).toBeLessThan(1e-9);
  });
  it('isotropic: K = G for screw, G/(1 - nu) for edge (Hirth & Lothe 1982 ch. 3)', () => {
    const K = energyFactorMatrix(isotropicVoigt(50, 0.3), [1, 2, 2]);
    const u = unitOf([1, 2, 2]);
    const e = perp(u, rng(3));
    expect(quad(K, u, u)).toBeCloseTo(50, 9);
    expect(quad(K, e, e)).toBeCloseTo(50 / 0.7, 9);
  });
});

describe('anisotropic ribbon width (Hirth & Lothe 1982 ch. 13)', () => {
  it('isotropic limit equals the isotropic formula (ch. 10); in Cu it equals the Peach-Koehler glide force balance of the Stroh stress', () => {
    const a = 0.36149;
    const b1: Vec3 = scale([1, 2, -1], a / 6), b2: Vec3 = scale([2, 1, 1], a / 6); // a/6[12-1] + a/6[211] = a/2[110]
    const u = unitOf([1, 1, 0]); // screw orientation of a/2[110] in (1-1-1)
    const nPlane = unitOf([1, -1, -1]);
    expect(Math.abs(dot(b1, nPlane))).toBeLessThan(1e-12);
    expect(ribbonWidth_nm(b1, b2, u, 50, 0.3, 45)).toBeCloseTo(anisotropicRibbonWidth_nm(b1, b2, u, isotropicVoigt(50, 0.3), 45), 9);
    const d = anisotropicRibbonWidth_nm(b1, b2, u, CU, 45);
    // Peach-Koehler (Hirth & Lothe ch. 5): F = (sigma . b2) x u, stress of partial 1 at partial 2 (distance d along u x n)
    const dir = unitOf(cross(u, nPlane));
    const f1 = anisotropicDislocation({ b_nm: b1, line: u, point_nm: [0, 0, 0], stiffness_GPa: CU });
    const g = new Float64Array(9);
    const x = scale(dir, d);
    f1.gradient(g, x[0], x[1], x[2]);
    const C = stiffnessTensor(CU);
    const sig = new Array<number>(9).fill(0);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) sig[i * 3 + j] += C[((i * 3 + j) * 3 + k) * 3 + l] * g[k * 3 + l];
    const sb: Vec3 = [0, 1, 2].map((i) => sig[i * 3] * b2[0] + sig[i * 3 + 1] * b2[1] + sig[i * 3 + 2] * b2[2]) as unknown as Vec3;
    const F = cross(sb, u); // GPa nm = N/m * 1
    const glide = dot(F, dir) * 1e3; // mJ/m^2
    expect(glide).toBeCloseTo(45, 6);
  });
});

describe('anisotropic dislocation: independent Stroh implementation (scripts/ref_stroh.py, numpy.linalg.eig)', () => {
  interface RefCase {
    kind: string;
    voigt: number[];
    line: Vec3;
    mdir: Vec3;
    b: Vec3;
    ref: Vec3;
    points: Vec3[];
    results: { dR: Vec3; grad: number[] }[];
    K: number[];
  }
  const fixture = JSON.parse(readFileSync(new URL('../reference/stroh.json', import.meta.url), 'utf8')) as { cases: RefCase[] };
  const compare = (cases: RefCase[]) => {
    for (const c of cases) {
      const f = anisotropicDislocation({ b_nm: c.b, line: c.line, point_nm: [0, 0, 0], stiffness_GPa: c.voigt, cutDirection: scale(c.mdir, -1), coreRadius_nm: 1e-6 });
      const r0 = new Float64Array(3), r1 = new Float64Array(3), g = new Float64Array(9);
      f.displacement(r0, c.ref[0], c.ref[1], c.ref[2]);
      const bl = norm(c.b);
      c.points.forEach((p, i) => {
        f.displacement(r1, p[0], p[1], p[2]);
        const dR = [r1[0] - r0[0], r1[1] - r0[1], r1[2] - r0[2]];
        expect(maxAbsDiff(dR, c.results[i].dR)).toBeLessThan(1e-8 * bl);
        f.gradient(g, p[0], p[1], p[2]);
        expect(maxAbsDiff(g, c.results[i].grad)).toBeLessThan(1e-8 * Math.max(1, maxAbs(c.results[i].grad)));
      });
      const K = energyFactorMatrix(c.voigt, c.line);
      expect(maxAbsDiff(K, c.K)).toBeLessThan(1e-8 * maxAbs(c.K));
    }
  };
  it('committed fixture (24 random cubic, hexagonal and triclinic crystals): displacement differences, gradient and K to 1e-8', () => {
    expect(fixture.cases.length).toBeGreaterThanOrEqual(20);
    compare(fixture.cases);
  });
  it('live run of the script on new random cases agrees to 1e-8', (ctx) => {
    const r = rng(2027);
    const cases = [CU, FE, ZN, CU, FE, ZN].map((V) => ({
      kind: 'library',
      voigt: V,
      line: randomUnit(r),
      mdir: randomUnit(r),
      b: scale(randomUnit(r), 0.25),
      ref: randomPoint(r, 4),
      points: [randomPoint(r, 6), randomPoint(r, 6), randomPoint(r, 6)],
    }));
    const code = readFileSync(new URL('../../scripts/ref_stroh.py', import.meta.url), 'utf8').replace("if __name__ == '__main__':", "if False:") +
      '\nprint(json.dumps(evaluate(json.load(sys.stdin))))\n';
    numpy.require(ctx);
    compare(pythonJson<RefCase[]>(code, cases));
  });
});

describe('anisotropic dislocation: every library material (data/materials.json)', () => {
  it('has Cij with a named source, and gives a finite field whose Burgers circuit closes to b for symmetry axes and random lines', () => {
    const r = rng(77);
    for (const m of listMaterials()) {
      expect(m.sources.elastic, m.name).toMatch(/\w/);
      const V = materialStiffness(m);
      const dirs: Vec3[] = m.lattice.system === 'hexagonal' ? [[0, 0, 1], [1, 0, 0], [1, 1, 0], [1, 0, 1]] : [[0, 0, 1], [1, 1, 0], [1, 1, 1], [1, 1, 2]];
      const lines = [...dirs.map((d) => directionToCartesian(m.lattice, d)), randomUnit(r)];
      for (const u of lines) {
        const b = scale(randomUnit(r), 0.25);
        const f = anisotropicDislocation({ b_nm: b, line: u, point_nm: [0, 0, 0], stiffness_GPa: V });
        const e1 = perp(u, r), e2 = cross(unitOf(u), e1);
        const verts = [[-2, -2], [2, -2], [2, 2], [-2, 2]].map(([s, t]) => [0, 1, 2].map((i) => s * e1[i] + t * e2[i]) as unknown as Vec3);
        const got = polygonIntegral(f, verts, 16, 12);
        expect(maxAbsDiff(got, b), `${m.name} line ${u.map((x) => x.toFixed(3)).join(' ')}`).toBeLessThan(1e-9);
        const o = new Float64Array(9);
        for (const x of [[0, 0, 0], [0.1, 0.05, 0], [1, 2, 3]] as Vec3[]) {
          f.displacement(o, x[0], x[1], x[2]);
          expect(o.subarray(0, 3).every(Number.isFinite)).toBe(true);
          f.gradient(o, x[0], x[1], x[2]);
          expect(o.every(Number.isFinite)).toBe(true);
        }
      }
    }
  });
});

describe('anisotropic dislocation: bad input', () => {
  it('a stiffness that is not positive definite or not 36 numbers is an InputError naming the field', () => {
    const bad = CU.slice();
    bad[21] = -5; // C44 < 0
    expect(() => anisotropicDislocation({ b_nm: [0.2, 0, 0], line: [0, 0, 1], point_nm: [0, 0, 0], stiffness_GPa: bad })).toThrow(InputError);
    expect(() => anisotropicDislocation({ b_nm: [0.2, 0, 0], line: [0, 0, 1], point_nm: [0, 0, 0], stiffness_GPa: [1, 2, 3] })).toThrow(/stiffness_GPa/);
    expect(() => voigtStiffness({ C11: 100, C12: 50 }, 'cubic', 'material.elastic.cij_GPa')).toThrow(/material\.elastic\.cij_GPa\.C44/);
  });
});
