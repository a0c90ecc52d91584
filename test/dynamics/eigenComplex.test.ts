/**
 * Complex eigen-solver (src/dynamics/complexEigen.ts) against two reference
 * libraries: Debian's python3-scipy (scipy.linalg.eig = LAPACK zgeev, through
 * the fixture written by scripts/ref_manybeam_eigen.py) and npm's mathjs
 * (math.eigs, run live).
 */
import { describe, expect, it } from 'vitest';
import { create, all, type Complex } from 'mathjs';
import { complexEigen, complexInverse } from '../../src/dynamics/complexEigen.js';
import { readFixture, type ComplexTable } from './manybeamFixtures.js';

interface EigenCase {
  name: string;
  n: number;
  matrix: ComplexTable;
  values: ComplexTable;
  vectors: ComplexTable;
}
const fixture = readFixture<{ generator: string; cases: EigenCase[] }>('manybeam-eigen.json');
const math = create(all);

/** max over eigenpairs of ||A v - lambda v|| / ||A||_max */
function residual(n: number, aRe: Float64Array, aIm: Float64Array, e: ReturnType<typeof complexEigen>): number {
  let anorm = 0;
  for (let i = 0; i < n * n; i++) anorm = Math.max(anorm, Math.hypot(aRe[i], aIm[i]));
  let worst = 0;
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < n; i++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j < n; j++) {
        const vr = e.vectorsRe[j * n + k];
        const vi = e.vectorsIm[j * n + k];
        sr += aRe[i * n + j] * vr - aIm[i * n + j] * vi;
        si += aRe[i * n + j] * vi + aIm[i * n + j] * vr;
      }
      const vr = e.vectorsRe[i * n + k];
      const vi = e.vectorsIm[i * n + k];
      sr -= e.valuesRe[k] * vr - e.valuesIm[k] * vi;
      si -= e.valuesRe[k] * vi + e.valuesIm[k] * vr;
      worst = Math.max(worst, Math.hypot(sr, si) / anorm);
    }
  }
  return worst;
}

/** index of the reference eigenvalue nearest to (re, im) */
function nearest(re: number, im: number, refRe: ArrayLike<number>, refIm: ArrayLike<number>): number {
  let best = 0;
  let bd = Infinity;
  for (let i = 0; i < refRe.length; i++) {
    const d = Math.hypot(re - refRe[i], im - refIm[i]);
    if (d < bd) {
      bd = d;
      best = i;
    }
  }
  return best;
}

function randomMatrix(n: number, seed: number): [Float64Array, Float64Array] {
  let s = seed;
  const r = (): number => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return s / 2147483648 - 0.5;
  };
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  for (let i = 0; i < n * n; i++) {
    re[i] = r();
    im[i] = r();
  }
  return [re, im];
}

describe('complexEigen vs scipy.linalg.eig (fixture from scripts/ref_manybeam_eigen.py)', () => {
  for (const c of fixture.cases) {
    it(`${c.name}: eigenvalues to 1e-10 relative, eigenvectors up to a phase`, () => {
      const n = c.n;
      const aRe = Float64Array.from(c.matrix.re);
      const aIm = Float64Array.from(c.matrix.im);
      const e = complexEigen(n, aRe, aIm);
      const used = new Set<number>();
      for (let k = 0; k < n; k++) {
        const r = nearest(e.valuesRe[k], e.valuesIm[k], c.values.re, c.values.im);
        used.add(r);
        const ref = Math.hypot(c.values.re[r], c.values.im[r]);
        // scipy.linalg.eig (LAPACK zgeev): same eigenvalue to 1e-10 relative
        expect(Math.hypot(e.valuesRe[k] - c.values.re[r], e.valuesIm[k] - c.values.im[r])).toBeLessThan(1e-10 * ref);
        // eigenvector: both unit norm, so |<v_ref, v>| = 1 when they agree up to a phase (scipy)
        let pr = 0;
        let pi = 0;
        for (let i = 0; i < n; i++) {
          const ar = c.vectors.re[i * n + r];
          const ai = -c.vectors.im[i * n + r];
          const br = e.vectorsRe[i * n + k];
          const bi = e.vectorsIm[i * n + k];
          pr += ar * br - ai * bi;
          pi += ar * bi + ai * br;
        }
        expect(Math.abs(1 - Math.hypot(pr, pi))).toBeLessThan(1e-10);
      }
      // a one-to-one match of the spectra
      expect(used.size).toBe(n);
      // residual of A v = lambda v (definition of an eigenpair)
      expect(residual(n, aRe, aIm, e)).toBeLessThan(1e-13);
    });
  }
});

describe('complexEigen vs mathjs eigs (live)', () => {
  for (const c of fixture.cases) {
    it(`${c.name}: same eigenvalues as math.eigs to 1e-10 relative`, () => {
      const n = c.n;
      const rows: Complex[][] = [];
      for (let i = 0; i < n; i++) {
        const row: Complex[] = [];
        for (let j = 0; j < n; j++) row.push(math.complex(c.matrix.re[i * n + j], c.matrix.im[i * n + j]));
        rows.push(row);
      }
      const res = math.eigs(math.matrix(rows), { eigenvectors: false });
      const vals = (res.values as unknown as { toArray(): Array<Complex | number> }).toArray();
      const mRe = vals.map((v) => (typeof v === 'number' ? v : v.re));
      const mIm = vals.map((v) => (typeof v === 'number' ? 0 : v.im));
      const e = complexEigen(n, Float64Array.from(c.matrix.re), Float64Array.from(c.matrix.im));
      for (let k = 0; k < n; k++) {
        const r = nearest(e.valuesRe[k], e.valuesIm[k], mRe, mIm);
        // mathjs 15 math.eigs (complex non-symmetric): same eigenvalue
        expect(Math.hypot(e.valuesRe[k] - mRe[r], e.valuesIm[k] - mIm[r])).toBeLessThan(1e-10 * Math.hypot(mRe[r], mIm[r]));
      }
    });
  }
});

describe('complexEigen: structure and robustness', () => {
  it('random matrices of size 1..31: residual ||A v - lambda v|| below 1e-13 ||A|| (definition)', () => {
    for (const n of [1, 2, 3, 4, 9, 31]) {
      const [re, im] = randomMatrix(n, 17 + n);
      expect(residual(n, re, im, complexEigen(n, re, im))).toBeLessThan(1e-13);
    }
  });

  it('a Hermitian matrix with a doubly degenerate eigenvalue: real spectrum, independent eigenvectors', () => {
    // A = Q diag(1, 1, 2, -0.5, 3) Q^H with Q unitary (from a QR of a random matrix, mathjs)
    const n = 5;
    const [xr, xi] = randomMatrix(n, 99);
    const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => math.complex(xr[i * n + j], xi[i * n + j])));
    const { Q } = math.qr(math.matrix(rows)) as unknown as { Q: { get(ix: number[]): Complex } };
    const lam = [1, 1, 2, -0.5, 3];
    const aRe = new Float64Array(n * n);
    const aIm = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let sr = 0;
        let si = 0;
        for (let k = 0; k < n; k++) {
          const a = math.complex(Q.get([i, k]));
          const b = math.conj(math.complex(Q.get([j, k]))) as Complex;
          const p = math.multiply(a, b) as Complex;
          sr += lam[k] * p.re;
          si += lam[k] * p.im;
        }
        aRe[i * n + j] = sr;
        aIm[i * n + j] = si;
      }
    }
    const e = complexEigen(n, aRe, aIm);
    const got = Array.from(e.valuesRe).sort((a, b) => a - b);
    const want = [...lam].sort((a, b) => a - b);
    for (let k = 0; k < n; k++) {
      expect(Math.abs(got[k] - want[k])).toBeLessThan(1e-13); // eigenvalues of a Hermitian matrix (construction)
      expect(Math.abs(e.valuesIm[k])).toBeLessThan(1e-13);
    }
    expect(residual(n, aRe, aIm, e)).toBeLessThan(1e-13);
    // the eigenvector matrix is invertible and well conditioned: C C^-1 = I
    const ir = new Float64Array(n * n);
    const ii = new Float64Array(n * n);
    complexInverse(ir, ii, n, e.vectorsRe, e.vectorsIm);
    let worst = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        let sr = 0;
        let si = 0;
        for (let k = 0; k < n; k++) {
          sr += e.vectorsRe[i * n + k] * ir[k * n + j] - e.vectorsIm[i * n + k] * ii[k * n + j];
          si += e.vectorsRe[i * n + k] * ii[k * n + j] + e.vectorsIm[i * n + k] * ir[k * n + j];
        }
        worst = Math.max(worst, Math.hypot(sr - (i === j ? 1 : 0), si));
      }
      // entries of the inverse stay of order 1 (the eigenvectors are nearly orthonormal)
      for (let j = 0; j < n; j++) expect(Math.hypot(ir[i * n + j], ii[i * n + j])).toBeLessThan(2);
    }
    expect(worst).toBeLessThan(1e-12);
  });

  it('complexInverse vs mathjs inv on a random 15 x 15 complex matrix', () => {
    const n = 15;
    const [re, im] = randomMatrix(n, 7);
    const outRe = new Float64Array(n * n);
    const outIm = new Float64Array(n * n);
    complexInverse(outRe, outIm, n, re, im);
    const rows = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => math.complex(re[i * n + j], im[i * n + j])));
    const inv = math.inv(math.matrix(rows)) as unknown as { get(ix: number[]): Complex };
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const ref = math.complex(inv.get([i, j]));
        // mathjs inv (Gauss-Jordan): same inverse
        expect(Math.hypot(outRe[i * n + j] - ref.re, outIm[i * n + j] - ref.im)).toBeLessThan(1e-11);
      }
    }
  });

  it('rejects a singular matrix and non-finite entries', () => {
    const z = new Float64Array(4);
    expect(() => complexInverse(new Float64Array(4), new Float64Array(4), 2, Float64Array.from([1, 2, 2, 4]), z)).toThrow(/singular/);
    expect(() => complexEigen(2, Float64Array.from([1, NaN, 0, 1]), z)).toThrow(/NaN/);
  });
});
