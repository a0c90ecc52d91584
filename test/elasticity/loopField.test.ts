/**
 * The polygon loop field (src/elasticity/loopField.ts) against Burgers' formula's
 * consequences and against independent references.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { circleSides, circleVertices, loopField, polygonAreaVector } from '../../src/elasticity/loopField.js';
import { straightDislocation } from '../../src/elasticity/straightDislocation.js';
import type { Vec3 } from '../../src/math/vec3.js';

const root = new URL('../../', import.meta.url).pathname;
const NU = 0.3;

function gradFD(f: ReturnType<typeof loopField>, x: number, y: number, z: number, h = 1e-4): number[] {
  const p = new Float64Array(3);
  const m = new Float64Array(3);
  const out: number[] = new Array(9).fill(0);
  for (let j = 0; j < 3; j++) {
    const d = [0, 0, 0];
    d[j] = h;
    f.displacement(p, x + d[0], y + d[1], z + d[2]);
    f.displacement(m, x - d[0], y - d[1], z - d[2]);
    for (let i = 0; i < 3; i++) out[3 * i + j] = (p[i] - m[i]) / (2 * h);
  }
  return out;
}

// an irregular (non-convex) pentagon in the plane z = 0, counterclockwise about +z
const PENTA = [-6, -5, 0, 7, -4, 0, 5, 6, 0, 0, 1, 0, -5, 5, 0];
const B: Vec3 = [0.12, -0.2, 0.25];

describe('loop field: consistency of displacement, gradient and directional derivative', () => {
  const f = loopField({ b_nm: B, vertices_nm: PENTA, poissonRatio: NU, coreRadius_nm: 0.25 });
  const pts: Vec3[] = [[1, 2, 3], [-4, 0.5, -2], [9, 9, 1.5], [0, -8, -0.7], [2, 1, 0.4]];
  it('gradient equals central differences of the displacement (away from the polygon surface and the cores)', () => {
    const g = new Float64Array(9);
    for (const [x, y, z] of pts) {
      f.gradient(g, x, y, z);
      const fd = gradFD(f, x, y, z);
      for (let k = 0; k < 9; k++) expect(g[k]).toBeCloseTo(fd[k], 7);
    }
  });
  it('directional(g, k) equals g . grad R . k', () => {
    const gv: [number, number, number] = [2.1, -0.7, 1.3];
    const kv: [number, number, number] = [0.2, 0.3, Math.sqrt(1 - 0.13)];
    const d = f.directional(gv, kv);
    const g = new Float64Array(9);
    for (const [x, y, z] of pts) {
      f.gradient(g, x, y, z);
      let s = 0;
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += gv[i] * g[3 * i + j] * kv[j];
      expect(d(x, y, z)).toBeCloseTo(s, 12);
    }
  });
});

interface RefCase {
  name: string;
  b: number[];
  nu: number;
  vertices?: number[];
  circle?: { centre: number[]; e1: number[]; e2: number[]; radius: number };
  points: { r: number[]; u: number[]; grad: number[] }[];
}
// written by `/usr/bin/python3 scripts/ref_loop_field.py`: scipy quad / dblquad of Burgers' formula
// (Hirth & Lothe 1982 ch. 4), solid angle as a surface integral, gradients differentiated under the integral
const ref = JSON.parse(readFileSync(`${root}test/reference/loop-field.json`, 'utf8')) as { cases: RefCase[] };

describe('loop field: independent quadrature of Burgers\' formula (scripts/ref_loop_field.py, scipy)', () => {
  for (const c of ref.cases.filter((k) => k.vertices !== undefined)) {
    it(`${c.name}: u and grad u agree to 1e-6 at random points`, () => {
      const f = loopField({ b_nm: c.b as unknown as Vec3, vertices_nm: c.vertices as number[], poissonRatio: c.nu, coreRadius_nm: 0.25 });
      const u = new Float64Array(3);
      const g = new Float64Array(9);
      for (const p of c.points) {
        f.displacement(u, p.r[0], p.r[1], p.r[2]);
        f.gradient(g, p.r[0], p.r[1], p.r[2]);
        for (let i = 0; i < 3; i++) expect(Math.abs(u[i] - p.u[i])).toBeLessThan(1e-6);
        for (let i = 0; i < 9; i++) expect(Math.abs(g[i] - p.grad[i])).toBeLessThan(1e-6);
      }
    });
  }
  it('a true circle (quadrature) is approached by the equal-area N-gon as N grows, the error falling about as 1/N^2', () => {
    const c = ref.cases.find((k) => k.circle !== undefined) as RefCase;
    const cc = c.circle as NonNullable<RefCase['circle']>;
    const err = (N: number): number => {
      const f = loopField({ b_nm: c.b as unknown as Vec3, vertices_nm: circleVertices(cc.centre as unknown as Vec3, cc.e1 as unknown as Vec3, cc.e2 as unknown as Vec3, cc.radius, N), poissonRatio: c.nu, coreRadius_nm: 0.25 });
      const g = new Float64Array(9);
      let e = 0;
      for (const p of c.points) {
        f.gradient(g, p.r[0], p.r[1], p.r[2]);
        for (let i = 0; i < 9; i++) e = Math.max(e, Math.abs(g[i] - p.grad[i]));
      }
      return e;
    };
    const e24 = err(24);
    const e96 = err(96);
    const e384 = err(384);
    expect(e96).toBeLessThan(e24 / 8); // 1/N^2: a factor 16 per factor 4 in N (allow 8)
    expect(e384).toBeLessThan(e96 / 8);
    expect(e384).toBeLessThan(2e-5);
  });
});

describe('loop field: Burgers circuit, jump across the loop surface (Hirth & Lothe 1982 ch. 4; FS/RH, physics.md section 5)', () => {
  const f = loopField({ b_nm: B, vertices_nm: PENTA, poissonRatio: NU, coreRadius_nm: 0.25 });
  it('the closed line integral of (grad u) . dl around a segment, right-handed about the line direction, is +b', () => {
    // segment 1 runs from (7,-4,0) to (5,6,0); circuit of radius 1.5 nm about its midpoint, in the plane normal to it
    const A: Vec3 = [7, -4, 0];
    const Bv: Vec3 = [5, 6, 0];
    const t = [Bv[0] - A[0], Bv[1] - A[1], 0];
    const tl = Math.hypot(t[0], t[1]);
    const u = [t[0] / tl, t[1] / tl, 0];
    const e1 = [0, 0, 1];
    const e2 = [u[1] * e1[2] - u[2] * e1[1], u[2] * e1[0] - u[0] * e1[2], u[0] * e1[1] - u[1] * e1[0]]; // u x e1: (e1, e2, u) right-handed
    const m = [(A[0] + Bv[0]) / 2, (A[1] + Bv[1]) / 2, 0];
    const rr = 1.5;
    const N = 4000;
    const g = new Float64Array(9);
    const sum = [0, 0, 0];
    for (let k = 0; k < N; k++) {
      const a = (2 * Math.PI * (k + 0.5)) / N;
      const p = [0, 1, 2].map((i) => m[i] + rr * (Math.cos(a) * e1[i] + Math.sin(a) * e2[i]));
      const dl = [0, 1, 2].map((i) => ((rr * 2 * Math.PI) / N) * (-Math.sin(a) * e1[i] + Math.cos(a) * e2[i]));
      f.gradient(g, p[0], p[1], p[2]);
      for (let i = 0; i < 3; i++) sum[i] += g[3 * i] * dl[0] + g[3 * i + 1] * dl[1] + g[3 * i + 2] * dl[2];
    }
    for (let i = 0; i < 3; i++) expect(sum[i]).toBeCloseTo(B[i], 6);
  });
  it('crossing the polygon along its normal (+z here) the displacement drops by b; outside the polygon it does not jump', () => {
    const up = new Float64Array(3);
    const dn = new Float64Array(3);
    for (const [x, y] of [[0, -2], [4, 0], [-3, 2]]) {
      f.displacement(up, x, y, 1e-7);
      f.displacement(dn, x, y, -1e-7);
      for (let i = 0; i < 3; i++) expect(up[i] - dn[i]).toBeCloseTo(-B[i], 6);
    }
    // (0, 3) lies in the notch of the non-convex pentagon, outside it
    for (const [x, y] of [[0, 3], [10, 0], [-8, -8]]) {
      f.displacement(up, x, y, 1e-7);
      f.displacement(dn, x, y, -1e-7);
      for (let i = 0; i < 3; i++) expect(up[i] - dn[i]).toBeCloseTo(0, 5);
    }
  });
});

describe('loop field: limits', () => {
  it('a large square loop near the middle of one side has the gradient of the straight dislocation (Hirth & Lothe 1982 ch. 3)', () => {
    const L = 20000;
    const sq = [-L / 2, -L / 2, 0, L / 2, -L / 2, 0, L / 2, L / 2, 0, -L / 2, L / 2, 0];
    const b: Vec3 = [0.3, -0.2, 0.25];
    const loop = loopField({ b_nm: b, vertices_nm: sq, poissonRatio: NU, coreRadius_nm: 0.25 });
    // side 0 runs along +x through (0, -L/2, 0)
    const line = straightDislocation({ b_nm: b, line: [1, 0, 0], point_nm: [0, -L / 2, 0], poissonRatio: NU, coreRadius_nm: 0.25 });
    const g1 = new Float64Array(9);
    const g2 = new Float64Array(9);
    for (const [x, dy, z] of [[1, 3, 2], [-2, -2, -3], [0.5, 1, -4], [3, -5, 0.5]]) {
      loop.gradient(g1, x, -L / 2 + dy, z);
      line.gradient(g2, x, -L / 2 + dy, z);
      let scaleG = 0;
      for (let i = 0; i < 9; i++) scaleG = Math.max(scaleG, Math.abs(g2[i]));
      // the other three sides, 1e4 nm away, add terms of relative size (distance / L) ~ 1e-3
      for (let i = 0; i < 9; i++) expect(Math.abs(g1[i] - g2[i])).toBeLessThan(2e-3 * scaleG);
    }
  });

  it('far from a prismatic loop the outward flux of u through a sphere tends to (1+nu)/(3(1-nu)) (-b.n A), a point dilatation (Eshelby 1956), error falling as 1/r^2', () => {
    // circular prismatic loop of radius 4 nm in z = 0, b = +0.25 n (n = +z, vertices counterclockwise): a vacancy loop,
    // inserted volume -b.n A (the faces on either side move towards each other)
    const a = 4;
    const b: Vec3 = [0, 0, 0.25];
    const v = circleVertices([0, 0, 0], [1, 0, 0], [0, 1, 0], a, 96);
    const f = loopField({ b_nm: b, vertices_nm: v, poissonRatio: NU });
    const A = polygonAreaVector(v);
    expect(A[2]).toBeCloseTo(Math.PI * a * a, 9);
    const expected = ((1 + NU) / (3 * (1 - NU))) * -(b[2] * A[2]);
    const flux = (R: number): number => {
      // Gauss-Legendre would do; the integrand is smooth: midpoint rule in cos(theta) and phi
      const nt = 200;
      const np = 8; // axially symmetric
      const u = new Float64Array(3);
      let s = 0;
      for (let i = 0; i < nt; i++) {
        const ct = -1 + (2 * (i + 0.5)) / nt;
        const st = Math.sqrt(1 - ct * ct);
        for (let j = 0; j < np; j++) {
          const ph = (2 * Math.PI * (j + 0.5)) / np;
          const n = [st * Math.cos(ph), st * Math.sin(ph), ct];
          f.displacement(u, R * n[0], R * n[1], R * n[2]);
          s += (u[0] * n[0] + u[1] * n[1] + u[2] * n[2]) * R * R * (2 / nt) * ((2 * Math.PI) / np);
        }
      }
      return s;
    };
    const e1 = Math.abs(flux(20) / expected - 1);
    const e2 = Math.abs(flux(80) / expected - 1);
    expect(e2).toBeLessThan(0.01);
    expect(e2).toBeLessThan(e1 / 4 + 1e-3);
  });

  it('far from a small loop u approaches the infinitesimal-loop field (Kroupa 1960; from memory, sign fixed by the inserted volume -b.n A), error falling as (a/r)^2', () => {
    const a = 2;
    const b: Vec3 = [0.1, -0.15, 0.2];
    const v = circleVertices([0, 0, 0], [1, 0, 0], [0, 1, 0], a, 64);
    const f = loopField({ b_nm: b, vertices_nm: v, poissonRatio: NU });
    const A = Math.PI * a * a;
    const n = [0, 0, 1];
    // u_i = -(A b_j n_k / (8 pi (1-nu) r^2)) [(1-2nu)(d_ij x_k + d_ik x_j - d_jk x_i) + 3 x_i x_j x_k], x unit
    const kroupa = (r: number[]): number[] => {
      const R = Math.hypot(r[0], r[1], r[2]);
      const x = r.map((c) => c / R);
      const out = [0, 0, 0];
      for (let i = 0; i < 3; i++) {
        let s = 0;
        for (let j = 0; j < 3; j++) {
          for (let k = 0; k < 3; k++) {
            const dij = i === j ? 1 : 0, dik = i === k ? 1 : 0, djk = j === k ? 1 : 0;
            s += b[j] * n[k] * ((1 - 2 * NU) * (dij * x[k] + dik * x[j] - djk * x[i]) + 3 * x[i] * x[j] * x[k]);
          }
        }
        out[i] = (-A * s) / (8 * Math.PI * (1 - NU) * R * R);
      }
      return out;
    };
    const u = new Float64Array(3);
    const relErr = (R: number): number => {
      let e = 0;
      for (const d of [[1, 2, 3], [-2, 1, 0.5], [0.3, -1, -2], [2, 2, -1]]) {
        const l = Math.hypot(d[0], d[1], d[2]);
        const r = d.map((c) => (R * c) / l);
        f.displacement(u, r[0], r[1], r[2]);
        const k = kroupa(r);
        const m = Math.hypot(k[0], k[1], k[2]);
        e = Math.max(e, Math.hypot(u[0] - k[0], u[1] - k[1], u[2] - k[2]) / m);
      }
      return e;
    };
    const e10 = relErr(10);
    const e40 = relErr(40);
    expect(e10).toBeLessThan(0.1);
    expect(e40).toBeLessThan(e10 / 10); // (a/r)^2: a factor 16 for 4 times the distance
  });

  it('circleSides: the sagitta r (1 - cos(pi/N)) stays within pixel/8, N even, in 12 .. 180', () => {
    for (const [r, p] of [[5, 0.5], [25, 1], [50, 0.25], [1, 1], [500, 0.1]]) {
      const N = circleSides(r, p);
      expect(N).toBeGreaterThanOrEqual(12);
      expect(N).toBeLessThanOrEqual(180);
      if (N < 180 && N > 12) {
        expect(r * (1 - Math.cos(Math.PI / N))).toBeLessThanOrEqual(p / 8);
        expect(r * (1 - Math.cos(Math.PI / (N - 2)))).toBeGreaterThan(p / 8);
        expect(N % 2).toBe(0);
      }
    }
  });
});

describe('loop field: the far field beyond FAR_LOOP_RADII loop radii', () => {
  it('the dipole (infinitesimal loop, Kroupa 1960) gradient differs from the polygon\'s by < 7 % at 8.5 radii (irregular pentagon; the first neglected term falls as R/r) and < 2 % for a circle (as (R/r)^2); directional agrees', () => {
    const b: Vec3 = [0.12, -0.2, 0.25];
    const exact = loopField({ b_nm: b, vertices_nm: PENTA, poissonRatio: NU, farRadii: Infinity });
    const fast = loopField({ b_nm: b, vertices_nm: PENTA, poissonRatio: NU });
    // largest vertex distance from the vertex centroid of PENTA
    const cx = (-6 + 7 + 5 + 0 - 5) / 5, cy = (-5 - 4 + 6 + 1 + 5) / 5;
    let R = 0;
    for (let i = 0; i < 5; i++) R = Math.max(R, Math.hypot(PENTA[3 * i] - cx, PENTA[3 * i + 1] - cy));
    const g1 = new Float64Array(9);
    const g2 = new Float64Array(9);
    const errAt = (m: number): number => {
      let e = 0;
      for (const d of [[1, 2, 3], [-2, 1, 0.5], [0.3, -1, -2], [2, 2, -1], [0, 0, 1]]) {
        const l = Math.hypot(d[0], d[1], d[2]);
        const p = [cx + (m * R * d[0]) / l, cy + (m * R * d[1]) / l, (m * R * d[2]) / l];
        exact.gradient(g1, p[0], p[1], p[2]);
        fast.gradient(g2, p[0], p[1], p[2]);
        let size = 0;
        let diff = 0;
        for (let i = 0; i < 9; i++) {
          size = Math.max(size, Math.abs(g1[i]));
          diff = Math.max(diff, Math.abs(g1[i] - g2[i]));
        }
        e = Math.max(e, diff / size);
      }
      return e;
    };
    const e85 = errAt(8.5);
    const e20 = errAt(20);
    expect(e85).toBeGreaterThan(0); // the far branch is in use
    expect(e85).toBeLessThan(0.07);
    expect(e20).toBeLessThan(e85 / 2);
    // a circle (even regular polygon, centrally symmetric: no quadrupole term)
    const cv = circleVertices([0, 0, 0], [1, 0, 0], [0, 1, 0], 3, 24);
    const ce = loopField({ b_nm: b, vertices_nm: cv, poissonRatio: NU, farRadii: Infinity });
    const cf = loopField({ b_nm: b, vertices_nm: cv, poissonRatio: NU });
    const Rc = Math.hypot(cv[0], cv[1]);
    let ec = 0;
    for (const d of [[1, 2, 3], [-2, 1, 0.5], [0.3, -1, -2]]) {
      const l = Math.hypot(d[0], d[1], d[2]);
      const p = d.map((c) => (8.5 * Rc * c) / l);
      ce.gradient(g1, p[0], p[1], p[2]);
      cf.gradient(g2, p[0], p[1], p[2]);
      let size = 0;
      let diff = 0;
      for (let i = 0; i < 9; i++) {
        size = Math.max(size, Math.abs(g1[i]));
        diff = Math.max(diff, Math.abs(g1[i] - g2[i]));
      }
      ec = Math.max(ec, diff / size);
    }
    expect(ec).toBeGreaterThan(0);
    expect(ec).toBeLessThan(0.02);
    const gv: [number, number, number] = [2.1, -0.7, 1.3];
    const kv: [number, number, number] = [0.2, 0.3, Math.sqrt(1 - 0.13)];
    const dir = fast.directional(gv, kv);
    const p = [cx + 10 * R, cy - 3 * R, 2 * R];
    fast.gradient(g2, p[0], p[1], p[2]);
    let s = 0;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += gv[i] * g2[3 * i + j] * kv[j];
    expect(dir(p[0], p[1], p[2])).toBeCloseTo(s, 14);
  });
});
