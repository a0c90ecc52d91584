import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { type Vec3, cross, dot, norm, scale, unit } from '../../src/math/vec3.js';
import { type DisplacementField, directionalProbe, superpose } from '../../src/elasticity/field.js';
import { straightDislocation } from '../../src/elasticity/straightDislocation.js';
import { edgeHalfSpaceImages } from '../../src/elasticity/surfaceEdgeImages.js';
import {
  PLATE_EDGE_GRID,
  plateEdgeCorrection,
  plateEdgeInterpolate,
  plateEdgeKink,
  plateEdgeLocal,
  plateEdgeProblem,
  plateEdgeResidualDirect,
  plateEdgeTable,
  residualSpectrum,
} from '../../src/elasticity/surfacePlateEdge.js';
import { circle, fdGradient, loopIntegral, maxAbs, maxAbsDiff, rng } from './helpers.js';
import { needPython, pythonJson } from '../python.js';

// A 60 nm foil with a tilted normal (any orientation must do), isotropic, mu = 1.
const N: Vec3 = unit([1, 2, 2]);
const T = 60;
const NU = 0.34;
const MU = 1;
const LAMBDA = (2 * MU * NU) / (1 - 2 * NU);
const E1 = unit(cross([0, 0, 1], N));
const E2 = cross(N, E1);
const BL = 0.255;
const U: Vec3 = E1; // the line, parallel to the surfaces
const M = cross(N, U); // across the line, in the surfaces (the module's x)

/** Isotropic Hooke's law (Hirth & Lothe 1982 ch. 2): the traction sigma . n from a displacement gradient. */
function traction(grad: ArrayLike<number>, n: Vec3): Vec3 {
  const eps = (i: number, j: number) => 0.5 * (grad[3 * i + j] + grad[3 * j + i]);
  const tr = eps(0, 0) + eps(1, 1) + eps(2, 2);
  const s = (i: number, j: number) => (i === j ? LAMBDA * tr : 0) + 2 * MU * eps(i, j);
  return [0, 1, 2].map((i) => s(i, 0) * n[0] + s(i, 1) * n[1] + s(i, 2) * n[2]) as unknown as Vec3;
}

/** The point at depth z, x across the line from P, s along the line. */
const pointAt = (P: Vec3, z: number, x: number, s = 0): Vec3 => {
  const z0 = dot(P, N);
  return [0, 1, 2].map((i) => P[i] + (z - z0) * N[i] + x * M[i] + s * U[i]) as unknown as Vec3;
};

const infiniteOf = (b: Vec3, P: Vec3) => straightDislocation({ b_nm: b, line: U, point_nm: P, poissonRatio: NU, coreRadius_nm: 1e-6 });
const plateOf = (b: Vec3, P: Vec3, t = T) => plateEdgeCorrection({ b_nm: b, line: U, point_nm: P, normal: N, thickness_nm: t, poissonRatio: NU });
const edgeOf = (b: Vec3): Vec3 => [0, 1, 2].map((i) => b[i] - dot(b, U) * U[i]) as unknown as Vec3;

// label, Burgers vector (edge part only: the screw part is not this module's), depth
const cases: [string, Vec3, number][] = [
  ['b along the normal, 7 nm deep', scale(N, BL), 7],
  ['b across the line in the surface plane, 12 nm deep', scale(M, BL), 12],
  ['b oblique, 2 nm below the entrance surface', unit([0, 1, 2].map((i) => 0.6 * M[i] - 0.8 * N[i]) as unknown as Vec3).map((v) => v * BL) as unknown as Vec3, 2],
  ['b oblique, mid-foil', unit([0, 1, 2].map((i) => 0.3 * M[i] + 0.9 * N[i]) as unknown as Vec3).map((v) => v * BL) as unknown as Vec3, 30],
  ['b across the line, 3 nm above the exit surface', scale(M, -BL), 57],
];
const OFFSETS = [-1000, -300, -120, -40, -12, -4, -1, -0.3, 0, 0.3, 1, 4, 12, 40, 120, 300, 1000];

describe('exact plate correction of the edge component of a line parallel to the surfaces (surfacePlateEdge.ts)', () => {
  for (const [label, b, depth] of cases) {
    const P = pointAt([0.3, -0.2, 0.1], depth, 2);
    it(`${label}: both surfaces are free of traction (Hooke's law, Hirth & Lothe ch. 2) to 1e-6 of the largest unrelaxed traction, also 300 and 1000 nm from the line; the same with the gradient from finite differences of the displacement (to 1e-5)`, () => {
      const inf = infiniteOf(b, P);
      const corr = plateOf(b, P);
      const g = new Float64Array(9), h = new Float64Array(9);
      let worstI = 0, worstR = 0, worstFd = 0;
      for (const z of [0, T]) for (const x of OFFSETS) {
        const p = pointAt(P, z, x, 3);
        inf.gradient(g, p[0], p[1], p[2]);
        worstI = Math.max(worstI, norm(traction(g, N)));
        corr.gradient(h, p[0], p[1], p[2]);
        for (let i = 0; i < 9; i++) h[i] += g[i];
        worstR = Math.max(worstR, norm(traction(h, N)));
        // one-sided differences would leave the foil: central differences along the surface, one-sided (second order) across it
        const fd = fdSurfaceGradient(corr, p, z === 0 ? 1 : -1, 1e-3);
        for (let i = 0; i < 9; i++) fd[i] += g[i];
        worstFd = Math.max(worstFd, norm(traction(fd, N)));
      }
      console.log(`${label}: largest surface traction / largest unrelaxed: ${(worstR / worstI).toExponential(1)} (analytic gradient), ${(worstFd / worstI).toExponential(1)} (differences of the displacement)`);
      expect(worstI).toBeGreaterThan((0.1 * MU * BL) / (2 * Math.PI * Math.min(depth, T - depth)));
      expect(worstR / worstI).toBeLessThan(1e-6);
      expect(worstFd / worstI).toBeLessThan(1e-5);
    });

    it(`${label}: the correction is in equilibrium (Navier: div sigma = 0 by central differences of the stress, h = 1e-3 nm): evaluated by the direct k integral to 3e-6 of the largest term d sigma_ij/dx_j, through the table to 3e-3 of mu b/(2 pi t^2); its gradient is that of its displacement (finite differences, h = 1e-3 nm, to 3e-5 of b/(2 pi d))`, () => {
      const corr = plateOf(b, P);
      const be = edgeOf(b);
      const prob = plateEdgeProblem(dot(be, M), dot(be, N), depth, T, NU);
      const images = edgeHalfSpaceImages({ b_nm: b, line: U, point_nm: P, normal: N, thickness_nm: T, poissonRatio: NU });
      const x0 = dot(P, M);
      const ig = new Float64Array(9), r4 = new Float64Array(4);
      // the correction without the table: both images plus the residual by the direct k integral
      const direct: DisplacementField = {
        displacement: corr.displacement,
        directional: corr.directional,
        gradient(out, x, y, z) {
          images.gradient(ig, x, y, z);
          plateEdgeResidualDirect(prob, x * M[0] + y * M[1] + z * M[2] - x0, x * N[0] + y * N[1] + z * N[2], r4);
          for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out[3 * i + j] = ig[3 * i + j] + r4[0] * M[i] * M[j] + r4[1] * M[i] * N[j] + r4[2] * N[i] * M[j] + r4[3] * N[i] * N[j];
        },
      };
      const g = new Float64Array(9);
      const navier = (f: DisplacementField, p: Vec3): [number, number] => {
        const h = 1e-3;
        const div = [0, 0, 0];
        let terms = 0;
        for (let j = 0; j < 3; j++) {
          const e: Vec3 = [j === 0 ? h : 0, j === 1 ? h : 0, j === 2 ? h : 0];
          f.gradient(g, p[0] + e[0], p[1] + e[1], p[2] + e[2]);
          const sp = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])];
          f.gradient(g, p[0] - e[0], p[1] - e[1], p[2] - e[2]);
          const sm = [traction(g, [1, 0, 0]), traction(g, [0, 1, 0]), traction(g, [0, 0, 1])];
          for (let i = 0; i < 3; i++) {
            div[i] += (sp[j][i] - sm[j][i]) / (2 * h);
            terms = Math.max(terms, Math.abs(sp[j][i] - sm[j][i]) / (2 * h));
          }
        }
        return [maxAbs(div), terms];
      };
      for (const [z, x] of [[0.5, 3], [depth, 0.7], [30, -8], [59.5, 2], [20, 70], [45, -250]] as const) {
        const p = pointAt(P, z, x, 1);
        const [dd, terms] = navier(direct, p);
        expect(dd).toBeLessThan(3e-6 * terms); // the differences' own truncation error, (h / distance)^2 / 6, dominates
        // through the table: the derivatives of a bicubic Hermite interpolant carry an O(h^3) error
        // (measured when written: up to 9e-4 of mu b/(2 pi t^2), next to the exit surface)
        expect(navier(corr, p)[0]).toBeLessThan((3e-3 * MU * BL) / (2 * Math.PI * T * T));
        // the displacement is its own bicubic Hermite table (derivatives: the gradient table, values: its integral):
        // its differences and the interpolated gradient agree to the interpolants' O(h^3) derivative error (measured
        // when written: up to 1.3e-5 of b/(2 pi d), mid-foil)
        corr.gradient(g, p[0], p[1], p[2]);
        expect(maxAbsDiff(g, fdGradient(corr, p, 1e-3))).toBeLessThan(3e-5 * (BL / (2 * Math.PI * Math.min(depth, T - depth))));
      }
    });

    it(`${label}: the Burgers circuit of the total field (infinite line + correction) closes to b (radius 1.5 nm and a circuit of 20 nm through the foil)`, () => {
      const total = superpose([infiniteOf(b, P), plateOf(b, P)]);
      const a = unit(cross(U, [0.2, 0.7, -0.4]));
      const bb = cross(U, a);
      for (const rad of [Math.min(1.5, 0.5 * depth, 0.5 * (T - depth)), Math.min(20, 0.9 * depth, 0.9 * (T - depth))]) {
        const loop = loopIntegral(
          total,
          circle(P, a, bb, rad),
          4096,
        );
        expect(maxAbsDiff(loop, b)).toBeLessThan(1e-7);
      }
    });
  }

  it('the directional probe and gradientAt equal the contraction of gradient (the renderer hot path)', () => {
    const b: Vec3 = [0, 1, 2].map((i) => 0.2 * M[i] + 0.1 * N[i] + 0.05 * U[i]) as unknown as Vec3;
    const P = pointAt([0, 0, 0], 17, 5);
    const f = plateOf(b, P);
    const gv: [number, number, number] = [4.5, 1.2, -0.7], kv: [number, number, number] = [0.1, 0.2, 0.97];
    const probe = directionalProbe(f, gv, kv);
    const q = new Float64Array(4), g = new Float64Array(9), g2 = new Float64Array(9);
    const r = rng(5);
    for (let n = 0; n < 50; n++) {
      const p = pointAt(P, 60 * r(), 800 * r() - 400, 10 * r());
      q.set(p);
      probe(q);
      f.gradient(g, p[0], p[1], p[2]);
      f.gradientAt!(g2, q);
      let s = 0;
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += gv[i] * g[3 * i + j] * kv[j];
      expect(Math.abs(q[3] - s)).toBeLessThan(1e-15 + 1e-12 * Math.abs(s));
      expect(maxAbsDiff(g, g2)).toBe(0);
    }
  });
});

/** Gradient by differences inside the foil: central along the surface, second-order one-sided along -side*n... into the foil. */
function fdSurfaceGradient(f: DisplacementField, p: Vec3, inward: 1 | -1, h: number): Float64Array {
  const out = new Float64Array(9);
  const a = new Float64Array(3), c = new Float64Array(3), e = new Float64Array(3);
  const dirs: Vec3[] = [M, U, N];
  const d = new Float64Array(9); // d[3 i + k]: derivative of component i along dirs[k]
  for (let k = 0; k < 3; k++) {
    const v = dirs[k];
    if (k < 2) {
      f.displacement(a, p[0] + h * v[0], p[1] + h * v[1], p[2] + h * v[2]);
      f.displacement(c, p[0] - h * v[0], p[1] - h * v[1], p[2] - h * v[2]);
      for (let i = 0; i < 3; i++) d[3 * i + k] = (a[i] - c[i]) / (2 * h);
    } else {
      const s = inward * h;
      f.displacement(e, p[0], p[1], p[2]);
      f.displacement(a, p[0] + s * v[0], p[1] + s * v[1], p[2] + s * v[2]);
      f.displacement(c, p[0] + 2 * s * v[0], p[1] + 2 * s * v[1], p[2] + 2 * s * v[2]);
      for (let i = 0; i < 3; i++) d[3 * i + k] = (-3 * e[i] + 4 * a[i] - c[i]) / (2 * s);
    }
  }
  // grad = sum_k d(:, k) dirs[k]^T (M, U, N orthonormal)
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out[3 * i + j] = d[3 * i] * M[j] + d[3 * i + 1] * U[j] + d[3 * i + 2] * N[j];
  return out;
}

describe('plate correction: the far field, the kink and the limits', () => {
  it('the Fourier k -> 0 limit of the rotation equals the beam-theory kink -6 b_x d (t - d)/t^3 (b_x = b.m, m = n x u) (Betti reciprocity with pure bending, exact in plane strain; e.g. Timoshenko & Goodier, Theory of Elasticity, pure bending of a beam), with the sign of the side of the extra half-plane', () => {
    // the side of the extra half-plane: where the infinite line's sigma_xx (along m) is compressive, just above or below it
    const bx = 0.25;
    const P = pointAt([0, 0, 0], 20, 0);
    const inf = infiniteOf(scale(M, bx), P);
    const g = new Float64Array(9);
    const pd = pointAt(P, 20 + 1, 0); // 1 nm deeper
    inf.gradient(g, pd[0], pd[1], pd[2]);
    const sxxDeeper = dot(M, traction(g, M));
    // extra half-plane on the deeper side (compression there): the deeper fibres are longer, the foil bends with
    // d omega/dx = -(integral of eps* (y - t/2))/I: Delta omega = -6 |b_x| d (t - d)/t^3
    const sideSign = sxxDeeper < 0 ? -1 : 1;
    for (const d of [2, 10, 30, 47]) {
      const beam = sideSign * (6 * bx * d * (T - d)) / T ** 3;
      expect(plateEdgeKink(bx, d, T)).toBeCloseTo(beam, 15);
      // the pole of the regularised spectrum: with the subtraction turned off, k * omega^ -> -i Delta omega
      const p = { ...plateEdgeProblem(bx, 0.1, d, T, NU), kink: 0 };
      const out = new Float64Array(16);
      const lim: number[] = [];
      for (const kt of [2e-4, 1e-4]) {
        residualSpectrum(p, kt / T, [0.5 * T], out);
        // G10 = eps_xy + omega: Im(k G10) -> -Delta omega, G01 = eps_xy - omega: Im(k G01) -> +Delta omega
        lim.push(-(kt / T) * out[5], (kt / T) * out[3]);
      }
      // the limit is approached linearly in k: Richardson from k t = 2e-4 and 1e-4
      for (const c of [0, 1]) expect(Math.abs(2 * lim[2 + c] - lim[c] - beam)).toBeLessThan(1e-6 * Math.abs(beam));
      // b along the normal makes no kink
      const q = { ...plateEdgeProblem(0, 0.25, d, T, NU), kink: 0 };
      residualSpectrum(q, 1e-4 / T, [0.5 * T], out);
      expect(Math.abs((1e-4 / T) * out[5])).toBeLessThan(1e-8);
    }
  });

  it('five thicknesses from the line the total field is a rigid rotation by +-kink/2 (the Fourier inverse of the regularised spectrum plus the closed-form pole, inside the table); at the table edge |x| = 6 t the table meets the closed-form far field (gradient and displacement)', () => {
    for (const [bx, by, d] of [[0.25, 0, 10], [-0.15, 0.2, 33]] as const) {
      const b: Vec3 = [0, 1, 2].map((i) => bx * M[i] + by * N[i]) as unknown as Vec3;
      const P = pointAt([0, 0, 0], d, 0);
      const total = superpose([infiniteOf(b, P), plateOf(b, P)]);
      const kink = plateEdgeKink(bx, d, T);
      const g = new Float64Array(9);
      for (const z of [1, 30, 59]) {
        const om: number[] = [];
        for (const x of [-5 * T, 5 * T]) {
          const p = pointAt(P, z, x);
          total.gradient(g, p[0], p[1], p[2]);
          // rotation about u in the (m, n) plane: (n.G.m - m.G.n)/2; strains vanish
          let nGm = 0, mGn = 0, mGm = 0;
          for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) {
            nGm += N[i] * g[3 * i + j] * M[j];
            mGn += M[i] * g[3 * i + j] * N[j];
            mGm += M[i] * g[3 * i + j] * M[j];
          }
          om.push(0.5 * (nGm - mGn));
          // the Papkovich-Fadle decay e^{-4.2 x/t} at 5 t: e^{-21}, times b/(2 pi d)
          expect(Math.abs(mGm)).toBeLessThan(1e-7 * Math.abs(kink) + 1e-10);
        }
        expect(Math.abs(om[1] - om[0] - kink)).toBeLessThan(1e-6 * Math.abs(kink));
        expect(Math.abs(om[1] + om[0])).toBeLessThan(1e-6 * Math.abs(kink));
      }
      // continuity at the table edge (the far-field closed form on one side, table + images on the other)
      const prob = plateEdgeProblem(bx, by, d, T, NU);
      const tb = plateEdgeTable(prob);
      const X = PLATE_EDGE_GRID.xRange * T;
      const a = new Float64Array(4), c = new Float64Array(4), G = new Float64Array(4);
      for (const y of [0, 7, 30, 60]) for (const x of [-X, X]) {
        plateEdgeLocal(prob, tb, x * (1 - 1e-12), y, a, G);
        plateEdgeLocal(prob, tb, x * (1 + 1e-12), y, c, G);
        expect(maxAbsDiff(a, c)).toBeLessThan(1e-8 * (BL / (2 * Math.PI * T)));
      }
      // the displacement too (table inside, closed form outside), and it is zero at the line
      const f = plateOf(b, P);
      const u1 = new Float64Array(3), u2 = new Float64Array(3);
      for (const y of [0, 7, 30, 60]) for (const x of [-X, X]) {
        const q1 = pointAt(P, y, x * (1 - 1e-12)), q2 = pointAt(P, y, x * (1 + 1e-12));
        f.displacement(u1, q1[0], q1[1], q1[2]);
        f.displacement(u2, q2[0], q2[1], q2[2]);
        expect(maxAbsDiff(u1, u2)).toBeLessThan(1e-9 * BL);
      }
      f.displacement(u1, P[0], P[1], P[2]);
      expect(maxAbs(u1)).toBeLessThan(1e-15);
    }
  });

  it('the table (bicubic Hermite, t/24 steps) against the direct k integral at 300 random points: error below 1e-6 of b/(2 pi t) (measured when written: 3e-7 for a line 12 nm deep, 1e-6 for 2 nm)', () => {
    const r = rng(11);
    for (const [bx, by, d] of [[0.2, 0.1, 12], [0.1, -0.2, 2], [-0.2, 0.15, 45]] as const) {
      const p = plateEdgeProblem(bx, by, d, T, NU);
      const tb = plateEdgeTable(p);
      const a = new Float64Array(4), c = new Float64Array(4);
      let worst = 0;
      for (let n = 0; n < 100; n++) {
        const x = (2 * r() - 1) * PLATE_EDGE_GRID.xRange * T, y = T * r();
        plateEdgeResidualDirect(p, x, y, a);
        plateEdgeInterpolate(tb, x, y, c);
        worst = Math.max(worst, maxAbsDiff(a, c));
      }
      console.log(`plate table, line ${d} nm deep: largest interpolation error ${(worst / (BL / (2 * Math.PI * T))).toExponential(2)} of b/(2 pi t)`);
      expect(worst).toBeLessThan((2e-6 * BL) / (2 * Math.PI * T));
    }
  });

  it('thick plate: a line 5 nm below the entrance surface of a 2000 nm plate gets, near that surface, the half-space image of that surface (Head 1953, surfaceEdgeImages.ts), up to the far surface\'s field (of order b/(2 pi t))', () => {
    const Tb = 2000;
    const b: Vec3 = [0, 1, 2].map((i) => 0.18 * M[i] + 0.18 * N[i]) as unknown as Vec3;
    const P = pointAt([0, 0, 0], 5, 0);
    const plate = plateOf(b, P, Tb);
    const head = edgeHalfSpaceImages({ b_nm: b, line: U, point_nm: P, normal: N, thickness_nm: Tb, poissonRatio: NU, only: 'entrance' });
    const g = new Float64Array(9), h = new Float64Array(9);
    let worst = 0, size = 0;
    for (const z of [0, 2, 5, 10]) for (const x of [-20, -5, -1, 0, 1, 5, 20]) {
      const p = pointAt(P, z, x);
      plate.gradient(g, p[0], p[1], p[2]);
      head.gradient(h, p[0], p[1], p[2]);
      worst = Math.max(worst, maxAbsDiff(g, h));
      size = Math.max(size, maxAbs(h));
    }
    console.log(`thick plate: plate - Head image ${worst.toExponential(2)}, Head image up to ${size.toExponential(2)}`);
    expect(size).toBeGreaterThan(BL / (2 * Math.PI * 30));
    expect(worst).toBeLessThan((2 * norm(b)) / (2 * Math.PI * Tb));
  });
});

describe('plate correction against an independent evaluation (scripts/ref_plate_edge.py: Hirth & Lothe stresses transformed in closed form, the 4 x 4 strip system by mpmath, scipy quad_vec)', () => {
  const py = needPython('scipy', 'numpy', 'mpmath');
  const script = readFileSync(new URL('../../scripts/ref_plate_edge.py', import.meta.url), 'utf8');
  it('12 points (both surfaces, the line, far out), mixed edge line 8 nm deep in a 60 nm foil: the 2 x 2 gradient agrees to 1e-6 of its largest value; the reference uses the same sign convention for the infinite line (its stress at one point)', (ctx) => {
    py.require(ctx);
    const bx = 0.2, by = -0.12, d = 8;
    const b: Vec3 = [0, 1, 2].map((i) => bx * M[i] + by * N[i]) as unknown as Vec3;
    const P = pointAt([1, 2, 3], d, 0);
    const local: [number, number][] = [[3, 0], [-2, 0], [0.5, 1], [0, 8.5], [15, 30], [-40, 59], [7, 60], [-120, 20], [200, 0], [-330, 45], [1, 4], [-6, 12]];
    const ref = pythonJson<{ grad: number[][]; stress: number[] }>(script, { bx, by, d, t: T, nu: NU, points: local });
    // the infinite line's stress at X = 3, Y = 2 from the code's field against the reference's Hirth & Lothe form
    const g = new Float64Array(9);
    const p0 = pointAt(P, d + 2, 3);
    infiniteOf(b, P).gradient(g, p0[0], p0[1], p0[2]);
    const sM = traction(g, M), sN = traction(g, N);
    expect(maxAbsDiff([dot(M, sM), dot(N, sN), dot(N, sM)], ref.stress)).toBeLessThan(1e-12);
    const f = plateOf(b, P);
    let worst = 0, size = 0;
    local.forEach(([x, y], q) => {
      const p = pointAt(P, y, x);
      f.gradient(g, p[0], p[1], p[2]);
      const mine: number[] = [];
      for (const a of [M, N]) for (const c of [M, N]) {
        let s = 0;
        for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) s += a[i] * g[3 * i + j] * c[j];
        mine.push(s);
      }
      worst = Math.max(worst, maxAbsDiff(mine, ref.grad[q]));
      size = Math.max(size, maxAbs(ref.grad[q]));
    });
    console.log(`plate correction against scripts/ref_plate_edge.py: largest difference ${(worst / size).toExponential(2)} of the largest component`);
    expect(worst).toBeLessThan(1e-6 * size);
  });
});
