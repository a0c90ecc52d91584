/**
 * The stretch matrix of the translation method (stretchMatrixN in src/dynamics/manyBeam.ts) against an
 * independent Dormand-Prince 5(4) step written out here: the coefficients of Hairer, Norsett & Wanner,
 * Solving ODEs I, 2nd ed., Table 5.2 (the fifth-order weights b = row 7), applied to the N x N matrix
 * equation of the interaction picture (physics.md section 4, manyBeam.ts header)
 *
 *     dU/dtau = 2 pi i beta'(a + tau) E(tau)^-1 M E(tau) U,   U(0) = I,   T = E(h) U(h),
 *
 * with E(tau) = diag(exp(2 pi i gamma_j tau)) and M = C^-1 diag(n_j) C built here from the Bloch waves
 * (themselves checked against SciPy in manybeamBloch.test.ts). One step from the identity is an algebraic
 * identity of the stages, so the two agree to rounding (1e-12), whatever re-arrangement the engine uses
 * (its first stages are expanded into fixed matrix products). Crystal numbers are invented test inputs.
 */
import { describe, expect, it } from 'vitest';
import { prepareColumnSystem, stretchMatrixN } from '../../src/dynamics/manyBeam.js';
import { systematicRowInput, systematicRowOrders, weakBeamDeviation } from '../../src/dynamics/manyBeamSystematicRow.js';
import { G_200_PER_NM, LAMBDA_200KV_NM, inventedAbsorption, inventedPotential } from './manybeamFixtures.js';

type C = [number, number];
type Mat = C[][];

const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const zeros = (n: number): Mat => Array.from({ length: n }, () => Array.from({ length: n }, (): C => [0, 0]));
const eye = (n: number): Mat => zeros(n).map((r, i) => r.map((_, j): C => (i === j ? [1, 0] : [0, 0])));
function matMul(a: Mat, b: Mat): Mat {
  const n = a.length;
  const out = zeros(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s: C = [0, 0];
      for (let k = 0; k < n; k++) {
        const p = mul(a[i][k], b[k][j]);
        s = [s[0] + p[0], s[1] + p[1]];
      }
      out[i][j] = s;
    }
  }
  return out;
}
/** sum_k w_k X_k for real weights */
function comb(terms: [number, Mat][]): Mat {
  const n = terms[0][1].length;
  const out = zeros(n);
  for (const [w, x] of terms) for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i][j] = [out[i][j][0] + w * x[i][j][0], out[i][j][1] + w * x[i][j][1]];
  return out;
}

// Hairer, Norsett & Wanner, Table 5.2 (Dormand-Prince 5(4))
const c = [0, 1 / 5, 3 / 10, 4 / 5, 8 / 9, 1];
const a = [
  [],
  [1 / 5],
  [3 / 40, 9 / 40],
  [44 / 45, -56 / 15, 32 / 9],
  [19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729],
  [9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656],
];
const b = [35 / 384, 0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84];

describe('stretchMatrixN: one step from the identity equals a textbook Dormand-Prince step (to rounding)', () => {
  const input = systematicRowInput({
    nMin: -1,
    nMax: 3,
    s_g: weakBeamDeviation(3, LAMBDA_200KV_NM, G_200_PER_NM),
    lambda_nm: LAMBDA_200KV_NM,
    g_per_nm: G_200_PER_NM,
    potential: inventedPotential(),
    absorption: inventedAbsorption(),
  });
  const orders = systematicRowOrders(-1, 3);
  const sys = prepareColumnSystem(input, orders, { incident: 1 });
  const n = sys.n;
  const at = (re: Float64Array, im: Float64Array): Mat => zeros(n).map((r, i) => r.map((_, j): C => [re[i * n + j], im[i * n + j]]));
  const cm = at(sys.cRe, sys.cIm);
  const cInv = at(sys.cInvRe, sys.cInvIm);
  const diagN = zeros(n).map((r, i) => r.map((_, j): C => (i === j ? [orders[i], 0] : [0, 0])));
  const M = matMul(cInv, matMul(diagN, cm));
  const E = (tau: number): Mat =>
    zeros(n).map((r, i) =>
      r.map((_, j): C => {
        if (i !== j) return [0, 0];
        const m = Math.exp(-2 * Math.PI * sys.gammaIm[i] * tau);
        const ph = 2 * Math.PI * sys.gammaRe[i] * tau;
        return [m * Math.cos(ph), m * Math.sin(ph)];
      }),
    );
  const Einv = (tau: number): Mat => E(-tau);
  /** one Dormand-Prince step of the interaction-picture equation from U = I over [z0, z0 + h] */
  function reference(z0: number, h: number, bp: (z: number) => number): Mat {
    const F = (tau: number, y: Mat): Mat => {
      const s = 2 * Math.PI * bp(z0 + tau);
      const r = matMul(Einv(tau), matMul(M, matMul(E(tau), y)));
      return r.map((row) => row.map((v): C => [-s * v[1], s * v[0]]));
    };
    const k: Mat[] = [];
    for (let st = 0; st < 6; st++) {
      const y = comb([[1, eye(n)], ...a[st].map((w, j): [number, Mat] => [h * w, k[j]])]);
      k.push(F(c[st] * h, y));
    }
    const u = comb([[1, eye(n)], ...b.map((w, j): [number, Mat] => [h * w, k[j]])]);
    return matMul(E(h), u);
  }

  // a screw-like beta' = b x / (2 pi (x^2 + (z - zc)^2)) (physics.md section 5), varying over the step
  const bp = (z: number): number => (2 * 1.5) / (2 * Math.PI * (1.5 * 1.5 + (z - 40.2) * (z - 40.2)));
  for (const [z0, h] of [
    [39.7, 0.5],
    [38.1, 0.37],
    [60, 0.5],
  ] as const) {
    it(`[${z0}, ${z0 + h}] nm, beta' from ${bp(z0).toFixed(3)} to ${bp(z0 + h).toFixed(3)}`, () => {
      const T = new Float64Array(2 * n * n);
      // start at ladder level 0 (5 nm): the step is the whole stretch; a loose tolerance accepts it
      const steps = stretchMatrixN(T, 0, sys, z0, z0 + h, bp, 1e-1, 0);
      expect(steps).toBe(1);
      const ref = reference(z0, h, bp);
      let diff = 0;
      let size = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          diff = Math.max(diff, Math.hypot(T[2 * (i * n + j)] - ref[i][j][0], T[2 * (i * n + j) + 1] - ref[i][j][1]));
          size = Math.max(size, Math.hypot(ref[i][j][0] - (i === j ? E(h)[i][i][0] : 0), ref[i][j][1] - (i === j ? E(h)[i][i][1] : 0)));
        }
      }
      expect(size, 'the strain changes the matrix').toBeGreaterThan(1e-3);
      expect(diff).toBeLessThan(1e-12);
    });
  }
});
