/**
 * Straight dislocation in an anisotropic infinite medium by the Stroh (1958)
 * sextic formalism (Hirth & Lothe 1982, Theory of Dislocations, ch. 13;
 * Ting 1996, Anisotropic Elasticity, ch. 5-6), with the conventions of
 * physics.md section 5 and the same interface, cut, Burgers sign and core
 * regularisation as the isotropic module (straightDislocation.ts).
 *
 * Frame: t = u (unit line direction), m = -c (c the cut direction, default
 * -e1 of `dislocationFrame`, i.e. m = e1), n = t x m. (ab)_jk = a_i C_ijkl b_l,
 * Q = (mm), R = (mn), T = (nn) and
 *
 *   N = [[ -T^-1 R^T ,          T^-1     ],
 *        [ R T^-1 R^T - Q ,  -R T^-1     ]],   N xi = p xi,  xi = (a, L).
 *
 * With the three p of positive imaginary part and 2 a.L = 1 the field is
 *   R(x) = (1/pi) Im sum_a a_a (L_a . b) ln(m.x + p_a n.x).
 * Its cut is the half-plane n.x = 0, m.x < 0, i.e. along +c; crossing it
 * towards +(u x c) = -n, R drops by b (FS/RH).
 *
 * Degenerate and nearly degenerate p (isotropic crystals, the c axis of a
 * hexagonal crystal, ...). N is not diagonalisable at exact degeneracy, so
 * the sum over eigenvectors is replaced by the matrix function it stands for.
 * J N is symmetric for J = [[0, I], [I, 0]], so the left eigenvectors are
 * J xi and the projector on the p with Im p > 0 is P = X (X^T J X)^-1 X^T J
 * for ANY basis X of that invariant subspace. Taking X = the first three
 * Schur vectors of N (reordered so that the Im p > 0 come first; the Schur
 * form is computed by src/dynamics/complexEigen.ts, backward stable), with
 * upper-triangular block T3, A = top half of X, B = bottom half,
 * G = X^T J X = A^T B + B^T A and c = G^-1 B^T b:
 *
 *   R(x)      = (1/pi) Im A ln(x1 I + x2 T3) c,              x1 = m.x, x2 = n.x
 *   dR/dx_j   = (1/pi) Im A (m_j I + n_j T3) (x1 I + x2 T3)^-1 c.
 *
 * The gradient needs one triangular solve (three complex divisions). The
 * logarithm of the triangular matrix uses the divided differences of ln
 * (Opitz's formula), computed stably for close arguments (log1p and a Taylor
 * series), so it is exact to rounding at any degeneracy. When the three p are
 * well separated (relative gap > DIAGONAL_GAP) the triangular block is
 * diagonalised once per line and the classic sum over three modes is used.
 * The energy-factor matrix (Hirth & Lothe ch. 13: E/L = b.K.b/(4 pi) ln(R/r0))
 * is K = 2 Im B G^-1 B^T, also free of eigenvectors.
 *
 * Constant of the displacement (a rigid translation, irrelevant to images but
 * fixed so that the isotropic limit is the Hirth & Lothe field exactly, and
 * so that the core regularisation below matches the isotropic one):
 * R = B0 ln(rho^2) + Phi(theta) with the angular part Phi averaged over a full
 * turn equal to b phi_d/(2 pi), phi_d the angle of m from e1 (as in the
 * isotropic module, whose angular part is b theta/(2 pi) plus terms of zero
 * mean). The mean of ln(cos w + p sin w) over w in (-pi, pi) is
 * ln((1 - i p)/2) for Im p > 0 (expand in exp(-2 i w)), so the mean is again a
 * function of T3.
 *
 * Core: as in straightDislocation.ts, with rc (default |b|), rm = 2 rc,
 * q = rho^2 + rc^2 (1 - rho^2/rm^2)^3 inside rm: R = B0 ln q + f Phi, f = rho^2/q,
 * exactly the singular field outside rm; the gradient inside rm leaves out the
 * term (b theta / 2 pi) grad f that would jump across the cut.
 */
import { type Vec3, cross, dot, norm, scale, sub } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { complexSchur } from '../dynamics/complexEigen.js';
import { type DisplacementField, withDirectional } from './field.js';
import { coreRadius, finiteVec3, nonZeroVec3 } from './checks.js';
import { dislocationFrame } from './straightDislocation.js';
import { checkVoigt, stiffnessTensor } from './stiffness.js';

/** Relative gap between the p above which the modes are diagonalised (below it the triangular form is used). */
export const DIAGONAL_GAP = 0.02;

/** The b-independent part of the Stroh solution for one line direction and one m. */
export interface StrohModes {
  readonly t: Vec3;
  readonly m: Vec3;
  readonly n: Vec3;
  /** Eigenvalues p (Im p > 0), the diagonal of T3. */
  readonly pRe: Float64Array;
  readonly pIm: Float64Array;
  /** Upper-triangular T3 (row-major 3 x 3, real and imaginary parts). */
  readonly tRe: Float64Array;
  readonly tIm: Float64Array;
  /** A (rows: Cartesian component, columns: mode). */
  readonly aRe: Float64Array;
  readonly aIm: Float64Array;
  /** B = the L block (rows: Cartesian component, columns: mode). */
  readonly lRe: Float64Array;
  readonly lIm: Float64Array;
  /** G^-1, G = A^T B + B^T A. */
  readonly giRe: Float64Array;
  readonly giIm: Float64Array;
  /** min |p_a - p_b| / max |p|. */
  readonly relativeGap: number;
  /** True when T3 was diagonalised (well separated p). */
  readonly diagonal: boolean;
}

// ---------- small complex helpers (per-line set-up only) ----------

function mat3InvSym(m: number[]): number[] {
  const [a, b, c, , e, f, , , i] = m;
  const d = m[3], g = m[6], h = m[7];
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  return [A / det, -(b * i - c * h) / det, (b * f - c * e) / det, B / det, (a * i - c * g) / det, -(a * f - c * d) / det, C / det, -(a * h - b * g) / det, (a * e - b * d) / det];
}

/** (ab)_jk = a_i C_ijkl b_l */
function contract(C: Float64Array, a: Vec3, b: Vec3): number[] {
  const out = new Array<number>(9).fill(0);
  for (let j = 0; j < 3; j++)
    for (let k = 0; k < 3; k++) {
      let s = 0;
      for (let i = 0; i < 3; i++) for (let l = 0; l < 3; l++) s += a[i] * C[((i * 3 + j) * 3 + k) * 3 + l] * b[l];
      out[j * 3 + k] = s;
    }
  return out;
}

const mul3 = (x: number[], y: number[]): number[] => {
  const o = new Array<number>(9).fill(0);
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) o[i * 3 + j] += x[i * 3 + k] * y[k * 3 + j];
  return o;
};
const tr3 = (x: number[]): number[] => [x[0], x[3], x[6], x[1], x[4], x[7], x[2], x[5], x[8]];

/** Complex 3 x 3 product (row-major re/im). */
export function cmul3(ar: Float64Array, ai: Float64Array, br: Float64Array, bi: Float64Array): [Float64Array, Float64Array] {
  const or = new Float64Array(9);
  const oi = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let sr = 0, si = 0;
      for (let k = 0; k < 3; k++) {
        const xr = ar[i * 3 + k], xi = ai[i * 3 + k], yr = br[k * 3 + j], yi = bi[k * 3 + j];
        sr += xr * yr - xi * yi;
        si += xr * yi + xi * yr;
      }
      or[i * 3 + j] = sr;
      oi[i * 3 + j] = si;
    }
  return [or, oi];
}

/** Complex 3 x 3 inverse by Gauss-Jordan with partial pivoting. */
export function cinv3(mr: Float64Array, mi: Float64Array): [Float64Array, Float64Array] {
  const ar = new Float64Array(18), ai = new Float64Array(18);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      ar[i * 6 + j] = mr[i * 3 + j];
      ai[i * 6 + j] = mi[i * 3 + j];
    }
  for (let i = 0; i < 3; i++) ar[i * 6 + 3 + i] = 1;
  for (let col = 0; col < 3; col++) {
    let p = col;
    for (let r = col + 1; r < 3; r++) if (Math.hypot(ar[r * 6 + col], ai[r * 6 + col]) > Math.hypot(ar[p * 6 + col], ai[p * 6 + col])) p = r;
    if (p !== col)
      for (let k = 0; k < 6; k++) {
        [ar[col * 6 + k], ar[p * 6 + k]] = [ar[p * 6 + k], ar[col * 6 + k]];
        [ai[col * 6 + k], ai[p * 6 + k]] = [ai[p * 6 + k], ai[col * 6 + k]];
      }
    const pr = ar[col * 6 + col], pi = ai[col * 6 + col];
    const d = pr * pr + pi * pi;
    if (!(d > 0)) throw new Error('internal: singular matrix in the Stroh normalisation');
    const qr = pr / d, qi = -pi / d;
    for (let k = 0; k < 6; k++) {
      const xr = ar[col * 6 + k], xi = ai[col * 6 + k];
      ar[col * 6 + k] = xr * qr - xi * qi;
      ai[col * 6 + k] = xr * qi + xi * qr;
    }
    for (let r = 0; r < 3; r++) {
      if (r === col) continue;
      const fr = ar[r * 6 + col], fi = ai[r * 6 + col];
      for (let k = 0; k < 6; k++) {
        const xr = ar[col * 6 + k], xi = ai[col * 6 + k];
        ar[r * 6 + k] -= fr * xr - fi * xi;
        ai[r * 6 + k] -= fr * xi + fi * xr;
      }
    }
  }
  const or = new Float64Array(9), oi = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      or[i * 3 + j] = ar[i * 6 + 3 + j];
      oi[i * 3 + j] = ai[i * 6 + 3 + j];
    }
  return [or, oi];
}

/**
 * Swap the adjacent diagonal entries k, k+1 of the upper-triangular (tr, ti)
 * (n x n) by a Givens rotation, updating the Schur vectors (zr, zi)
 * (LAPACK ztrexc).
 */
function swapSchur(n: number, k: number, tr: Float64Array, ti: Float64Array, zr: Float64Array, zi: Float64Array): void {
  const t11r = tr[k * n + k], t11i = ti[k * n + k];
  const t22r = tr[(k + 1) * n + k + 1], t22i = ti[(k + 1) * n + k + 1];
  // rotation [c s; -conj(s) c] taking (f, g) = (t12, t22 - t11) to (r, 0)
  const fr = tr[k * n + k + 1], fi = ti[k * n + k + 1];
  const gr = t22r - t11r, gi = t22i - t11i;
  const fa = Math.hypot(fr, fi), ga = Math.hypot(gr, gi);
  const nrm = Math.hypot(fa, ga);
  let c: number, sr: number, si: number;
  if (fa === 0) {
    c = 0;
    sr = gr / ga;
    si = -gi / ga;
  } else {
    c = fa / nrm;
    const ur = fr / fa, ui = fi / fa;
    // s = (f/|f|) conj(g) / nrm
    sr = (ur * gr + ui * gi) / nrm;
    si = (ui * gr - ur * gi) / nrm;
  }
  // rows k, k+1 (columns k+2..): x <- c x + s y, y <- c y - conj(s) x
  for (let j = k + 2; j < n; j++) {
    const xr = tr[k * n + j], xi = ti[k * n + j], yr = tr[(k + 1) * n + j], yi = ti[(k + 1) * n + j];
    tr[k * n + j] = c * xr + sr * yr - si * yi;
    ti[k * n + j] = c * xi + sr * yi + si * yr;
    tr[(k + 1) * n + j] = c * yr - (sr * xr + si * xi);
    ti[(k + 1) * n + j] = c * yi - (sr * xi - si * xr);
  }
  // columns k, k+1 (rows 0..k-1) of T and all rows of Z: x <- c x + conj(s) y, y <- c y - s x
  const cols = (mr: Float64Array, mi: Float64Array, rows: number): void => {
    for (let i = 0; i < rows; i++) {
      const xr = mr[i * n + k], xi = mi[i * n + k], yr = mr[i * n + k + 1], yi = mi[i * n + k + 1];
      mr[i * n + k] = c * xr + sr * yr + si * yi;
      mi[i * n + k] = c * xi + sr * yi - si * yr;
      mr[i * n + k + 1] = c * yr - (sr * xr - si * xi);
      mi[i * n + k + 1] = c * yi - (sr * xi + si * xr);
    }
  };
  cols(tr, ti, k);
  cols(zr, zi, n);
  tr[k * n + k] = t22r;
  ti[k * n + k] = t22i;
  tr[(k + 1) * n + k + 1] = t11r;
  ti[(k + 1) * n + k + 1] = t11i;
}

/**
 * The Stroh modes of line direction `line` in the crystal of stiffness tensor
 * C (81 numbers, GPa), for the reference direction m (perpendicular to the
 * line; the cut lies along -m). `forceTriangular` keeps the triangular form
 * even for well separated p (tests of the degenerate path).
 */
export function strohModes(C: Float64Array, line: Vec3, mDir: Vec3, forceTriangular = false): StrohModes {
  const t = scale(line, 1 / norm(line));
  const mp = sub(mDir, scale(t, dot(mDir, t)));
  const m = scale(mp, 1 / norm(mp));
  const n = cross(t, m);
  const Qm = contract(C, m, m);
  const Rm = contract(C, m, n);
  const Tm = contract(C, n, n);
  const Ti = mat3InvSym(Tm);
  const RT = tr3(Rm);
  const N1 = mul3(Ti, RT).map((x) => -x);
  const N3 = mul3(mul3(Rm, Ti), RT).map((x, i) => x - Qm[i]);
  const N4 = mul3(Rm, Ti).map((x) => -x);
  const Nr = new Float64Array(36);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      Nr[i * 6 + j] = N1[i * 3 + j];
      Nr[i * 6 + 3 + j] = Ti[i * 3 + j];
      Nr[(3 + i) * 6 + j] = N3[i * 3 + j];
      Nr[(3 + i) * 6 + 3 + j] = N4[i * 3 + j];
    }
  const { tRe, tIm, zRe, zIm } = complexSchur(6, Nr, new Float64Array(36));
  // reorder: Im p > 0 first (bubble the upper-half-plane eigenvalues up)
  for (let pass = 0; pass < 6; pass++) {
    let swapped = false;
    for (let k = 0; k < 5; k++) {
      if (tIm[k * 6 + k] < 0 && tIm[(k + 1) * 6 + k + 1] > 0) {
        swapSchur(6, k, tRe, tIm, zRe, zIm);
        swapped = true;
      }
    }
    if (!swapped) break;
  }
  let pmax = 0;
  for (let k = 0; k < 6; k++) pmax = Math.max(pmax, Math.hypot(tRe[k * 7], tIm[k * 7]));
  for (let k = 0; k < 6; k++) {
    const im = tIm[k * 7];
    if (!(Math.abs(im) > 1e-10 * pmax) || (k < 3) !== im > 0) {
      throw new Error('internal: the Stroh eigenvalues must be three pairs of complex conjugates (stiffness not positive definite?)');
    }
  }
  let T3r: Float64Array = new Float64Array(9), T3i: Float64Array = new Float64Array(9);
  let Ar: Float64Array = new Float64Array(9), Ai: Float64Array = new Float64Array(9);
  let Lr: Float64Array = new Float64Array(9), Li: Float64Array = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      if (j >= i) {
        T3r[i * 3 + j] = tRe[i * 6 + j];
        T3i[i * 3 + j] = tIm[i * 6 + j];
      }
      Ar[i * 3 + j] = zRe[i * 6 + j];
      Ai[i * 3 + j] = zIm[i * 6 + j];
      Lr[i * 3 + j] = zRe[(3 + i) * 6 + j];
      Li[i * 3 + j] = zIm[(3 + i) * 6 + j];
    }
  const pRe = Float64Array.of(T3r[0], T3r[4], T3r[8]);
  const pIm = Float64Array.of(T3i[0], T3i[4], T3i[8]);
  let gap = Infinity;
  let pm = 0;
  for (let a = 0; a < 3; a++) {
    pm = Math.max(pm, Math.hypot(pRe[a], pIm[a]));
    for (let b = a + 1; b < 3; b++) gap = Math.min(gap, Math.hypot(pRe[a] - pRe[b], pIm[a] - pIm[b]));
  }
  const relativeGap = gap / pm;
  const diagonal = !forceTriangular && relativeGap > DIAGONAL_GAP;
  if (diagonal) {
    // eigenvectors of T3: V unit upper triangular; X <- X V, T3 <- diag(p)
    const Vr = new Float64Array(9), Vi = new Float64Array(9);
    for (let k = 0; k < 3; k++) {
      Vr[k * 3 + k] = 1;
      for (let i = k - 1; i >= 0; i--) {
        let sr = 0, si = 0;
        for (let j = i + 1; j <= k; j++) {
          sr += T3r[i * 3 + j] * Vr[j * 3 + k] - T3i[i * 3 + j] * Vi[j * 3 + k];
          si += T3r[i * 3 + j] * Vi[j * 3 + k] + T3i[i * 3 + j] * Vr[j * 3 + k];
        }
        const dr = pRe[i] - pRe[k], di = pIm[i] - pIm[k];
        const d2 = dr * dr + di * di;
        Vr[i * 3 + k] = -(sr * dr + si * di) / d2;
        Vi[i * 3 + k] = -(si * dr - sr * di) / d2;
      }
    }
    [Ar, Ai] = cmul3(Ar, Ai, Vr, Vi);
    [Lr, Li] = cmul3(Lr, Li, Vr, Vi);
    T3r = new Float64Array(9);
    T3i = new Float64Array(9);
    for (let k = 0; k < 3; k++) {
      T3r[k * 4] = pRe[k];
      T3i[k * 4] = pIm[k];
    }
  }
  // G = A^T L + L^T A (complex symmetric), its inverse
  const Gr = new Float64Array(9), Gi = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let sr = 0, si = 0;
      for (let k = 0; k < 3; k++) {
        const a1r = Ar[k * 3 + i], a1i = Ai[k * 3 + i], l2r = Lr[k * 3 + j], l2i = Li[k * 3 + j];
        const l1r = Lr[k * 3 + i], l1i = Li[k * 3 + i], a2r = Ar[k * 3 + j], a2i = Ai[k * 3 + j];
        sr += a1r * l2r - a1i * l2i + l1r * a2r - l1i * a2i;
        si += a1r * l2i + a1i * l2r + l1r * a2i + l1i * a2r;
      }
      Gr[i * 3 + j] = sr;
      Gi[i * 3 + j] = si;
    }
  const [giRe, giIm] = cinv3(Gr, Gi);
  return { t, m, n, pRe, pIm, tRe: T3r, tIm: T3i, aRe: Ar, aIm: Ai, lRe: Lr, lIm: Li, giRe, giIm, relativeGap, diagonal };
}

/**
 * Energy-factor matrix K (GPa) of a straight dislocation along `line`:
 * E/L = b.K.b / (4 pi) ln(R/r0) (Hirth & Lothe 1982 ch. 13; isotropic limit
 * K = G for screw, G/(1 - nu) for edge components). K = 2 Im B G^-1 B^T.
 */
export function energyFactor(modes: StrohModes): number[] {
  const [Xr, Xi] = cmul3(modes.lRe, modes.lIm, modes.giRe, modes.giIm);
  const K = new Array<number>(9).fill(0);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k < 3; k++) s += Xr[i * 3 + k] * modes.lIm[j * 3 + k] + Xi[i * 3 + k] * modes.lRe[j * 3 + k];
      K[i * 3 + j] = 2 * s;
    }
  // symmetrise the rounding
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < i; j++) {
      const v = 0.5 * (K[i * 3 + j] + K[j * 3 + i]);
      K[i * 3 + j] = v;
      K[j * 3 + i] = v;
    }
  return K;
}

/** Energy-factor matrix (GPa) for a line direction in a crystal given by its 6 x 6 Voigt stiffness (GPa). */
export function energyFactorMatrix(voigt: readonly number[], line: Vec3): number[] {
  checkVoigt(voigt as number[], 'stiffness');
  const t = nonZeroVec3(line, 'line direction');
  return energyFactor(strohModes(stiffnessTensor(voigt), t, dislocationFrame([1, 0, 0], t).e1));
}

// ---------- divided differences of ln (scratch registers, not re-entrant) ----------

const S = new Float64Array(2);

/** ln[a, b] = (ln a - ln b)/(a - b) (= 1/b when a = b), for a, b in one open half-plane or equal; result in S. */
function lnDiff(ar: number, ai: number, br: number, bi: number): void {
  const dr = ar - br, di = ai - bi;
  const b2 = br * br + bi * bi;
  if (dr === 0 && di === 0) {
    S[0] = br / b2;
    S[1] = -bi / b2;
    return;
  }
  // w = (a - b)/b
  const wr = (dr * br + di * bi) / b2, wi = (di * br - dr * bi) / b2;
  const w2 = wr * wr + wi * wi;
  let nr: number, ni: number, er: number, ei: number; // numerator / denominator
  if (w2 < 0.25) {
    // log1p(w)/w / b, complex log1p without cancellation
    nr = 0.5 * Math.log1p(2 * wr + w2);
    ni = Math.atan2(wi, 1 + wr);
    // divide by w b = a - b
    er = dr;
    ei = di;
  } else {
    nr = 0.5 * Math.log((ar * ar + ai * ai) / b2);
    ni = Math.atan2(ai, ar) - Math.atan2(bi, br);
    er = dr;
    ei = di;
  }
  const e2 = er * er + ei * ei;
  S[0] = (nr * er + ni * ei) / e2;
  S[1] = (ni * er - nr * ei) / e2;
}

/** ln[a, b, c] (symmetric), result in S. */
function lnDiff2(ar: number, ai: number, br: number, bi: number, cr: number, ci: number): void {
  // (P, Q) the most distant pair, M the third point
  const dab = Math.hypot(ar - br, ai - bi), dbc = Math.hypot(br - cr, bi - ci), dac = Math.hypot(ar - cr, ai - ci);
  let Pr = ar, Pi = ai, Qr = cr, Qi = ci, Mr = br, Mi = bi;
  if (dab >= dbc && dab >= dac) {
    Qr = br; Qi = bi; Mr = cr; Mi = ci;
  } else if (dbc >= dac) {
    Pr = br; Pi = bi; Mr = ar; Mi = ai;
  }
  const m2 = Mr * Mr + Mi * Mi;
  const pr = ((Pr - Mr) * Mr + (Pi - Mi) * Mi) / m2, pi = ((Pi - Mi) * Mr - (Pr - Mr) * Mi) / m2;
  const qr = ((Qr - Mr) * Mr + (Qi - Mi) * Mi) / m2, qi = ((Qi - Mi) * Mr - (Qr - Mr) * Mi) / m2;
  if (Math.max(pr * pr + pi * pi, qr * qr + qi * qi) < 0.01) {
    // Taylor series about M: ln[P,M,Q] = (1/M^2) sum_{k>=2} (-1)^(k+1)/k h_{k-2}(p, q)
    let hr = 1, hi = 0; // h_0
    let qkr = 1, qki = 0; // q^0
    let sr = 0, si = 0;
    for (let k = 2; k <= 24; k++) {
      const c = (k % 2 === 0 ? -1 : 1) / k;
      sr += c * hr;
      si += c * hi;
      // h_{m} = p h_{m-1} + q^m
      const nqr = qkr * qr - qki * qi, nqi = qkr * qi + qki * qr;
      qkr = nqr;
      qki = nqi;
      const nhr = pr * hr - pi * hi + qkr, nhi = pr * hi + pi * hr + qki;
      hr = nhr;
      hi = nhi;
    }
    // divide by M^2
    const M2r = Mr * Mr - Mi * Mi, M2i = 2 * Mr * Mi;
    const d = M2r * M2r + M2i * M2i;
    S[0] = (sr * M2r + si * M2i) / d;
    S[1] = (si * M2r - sr * M2i) / d;
    return;
  }
  lnDiff(Pr, Pi, Mr, Mi);
  const xr = S[0], xi = S[1];
  lnDiff(Mr, Mi, Qr, Qi);
  const yr = xr - S[0], yi = xi - S[1];
  const er = Pr - Qr, ei = Pi - Qi;
  const e2 = er * er + ei * ei;
  S[0] = (yr * er + yi * ei) / e2;
  S[1] = (yi * er - yr * ei) / e2;
}

// scratch of applyLog (no allocation per call; not re-entrant, JS runs one call at a time per thread)
const LZR = new Float64Array(3), LZI = new Float64Array(3), LFR = new Float64Array(9), LFI = new Float64Array(9);
const LYR = new Float64Array(3), LYI = new Float64Array(3);

/**
 * v = A ln(x1 I + x2 T3) c (complex 3-vector into out[0..5] as re, im pairs)
 * for complex x1, x2 such that all x1 + x2 p lie in one open half-plane.
 */
function applyLog(
  out: Float64Array,
  x1r: number, x1i: number, x2r: number, x2i: number,
  tr: Float64Array, ti: Float64Array, ar: Float64Array, ai: Float64Array, cr: Float64Array, ci: Float64Array, diagonal: boolean,
): void {
  const zr = LZR, zi = LZI, Fr = LFR, Fi = LFI;
  if (!diagonal) {
    Fr.fill(0);
    Fi.fill(0);
  }
  for (let k = 0; k < 3; k++) {
    const pr = tr[k * 4], pi = ti[k * 4];
    zr[k] = x1r + x2r * pr - x2i * pi;
    zi[k] = x1i + x2r * pi + x2i * pr;
    Fr[k * 4] = 0.5 * Math.log(zr[k] * zr[k] + zi[k] * zi[k]);
    Fi[k * 4] = Math.atan2(zi[k], zr[k]);
  }
  if (!diagonal) {
    // x2 t_ij ln[z_i, z_j] and the second-order term of F_02
    const off = (i: number, j: number): void => {
      lnDiff(zr[i], zi[i], zr[j], zi[j]);
      const ur = x2r * tr[i * 3 + j] - x2i * ti[i * 3 + j], ui = x2r * ti[i * 3 + j] + x2i * tr[i * 3 + j];
      Fr[i * 3 + j] = ur * S[0] - ui * S[1];
      Fi[i * 3 + j] = ur * S[1] + ui * S[0];
    };
    off(0, 1);
    off(1, 2);
    off(0, 2);
    lnDiff2(zr[0], zi[0], zr[1], zi[1], zr[2], zi[2]);
    // x2^2 t01 t12
    const x22r = x2r * x2r - x2i * x2i, x22i = 2 * x2r * x2i;
    const ttr = tr[1] * tr[5] - ti[1] * ti[5], tti = tr[1] * ti[5] + ti[1] * tr[5];
    const kr = x22r * ttr - x22i * tti, ki = x22r * tti + x22i * ttr;
    Fr[2] += kr * S[0] - ki * S[1];
    Fi[2] += kr * S[1] + ki * S[0];
  }
  // y = F c, out = A y
  const yr = LYR, yi = LYI;
  for (let i = 0; i < 3; i++) {
    yr[i] = 0;
    yi[i] = 0;
    for (let j = i; j < (diagonal ? i + 1 : 3); j++) {
      yr[i] += Fr[i * 3 + j] * cr[j] - Fi[i * 3 + j] * ci[j];
      yi[i] += Fr[i * 3 + j] * ci[j] + Fi[i * 3 + j] * cr[j];
    }
  }
  for (let i = 0; i < 3; i++) {
    let sr = 0, si = 0;
    for (let j = 0; j < 3; j++) {
      sr += ar[i * 3 + j] * yr[j] - ai[i * 3 + j] * yi[j];
      si += ar[i * 3 + j] * yi[j] + ai[i * 3 + j] * yr[j];
    }
    out[2 * i] = sr;
    out[2 * i + 1] = si;
  }
}

export interface AnisotropicDislocationOptions {
  /** Cartesian Burgers vector (nm), FS/RH about `line`. */
  readonly b_nm: Vec3;
  /** Line direction u, any length. */
  readonly line: Vec3;
  /** A point on the line (nm). */
  readonly point_nm: Vec3;
  /** 6 x 6 Voigt stiffness in the crystal Cartesian frame (36 numbers, GPa). */
  readonly stiffness_GPa: readonly number[];
  /** Cut direction c as in straightDislocation.ts (default -e1 of dislocationFrame). */
  readonly cutDirection?: Vec3;
  /** Core radius rc (nm), > 0. Default |b|. */
  readonly coreRadius_nm?: number;
  /** Tests only: keep the triangular (degenerate-safe) evaluation even for well separated p. */
  readonly forceTriangular?: boolean;
}

/** The per-line data of an anisotropic dislocation (exported for tests and reports). */
export interface AnisotropicLine {
  readonly modes: StrohModes;
  /** c = G^-1 B^T b (complex 3-vector). */
  readonly cRe: Float64Array;
  readonly cIm: Float64Array;
  /** Coefficient vector B0 of ln(rho^2) in R (nm). */
  readonly logCoefficient: Vec3;
  /** Constant added to (1/pi) Im A ln(...) c (nm). */
  readonly offset: Vec3;
}

export function anisotropicLine(opts: AnisotropicDislocationOptions): AnisotropicLine {
  const b = nonZeroVec3(opts.b_nm, 'dislocation b_nm');
  const line = nonZeroVec3(opts.line, 'dislocation line');
  checkVoigt(opts.stiffness_GPa as number[], 'dislocation stiffness_GPa');
  const fr = dislocationFrame(b, line);
  let mDir: Vec3 = fr.e1;
  if (opts.cutDirection !== undefined) {
    const c = nonZeroVec3(opts.cutDirection, 'dislocation cutDirection');
    const cp = sub(c, scale(fr.e3, dot(c, fr.e3)));
    if (!(norm(cp) > 1e-9 * norm(c))) {
      throw new InputError('dislocation cutDirection must not be parallel to the line; give a direction across the line, e.g. along the fault.');
    }
    mDir = scale(cp, -1 / norm(cp));
  }
  const modes = strohModes(stiffnessTensor(opts.stiffness_GPa), line, mDir, opts.forceTriangular ?? false);
  // c = G^-1 (B^T b)
  const lbr = [0, 0, 0], lbi = [0, 0, 0];
  for (let j = 0; j < 3; j++)
    for (let k = 0; k < 3; k++) {
      lbr[j] += modes.lRe[k * 3 + j] * b[k];
      lbi[j] += modes.lIm[k * 3 + j] * b[k];
    }
  const cRe = new Float64Array(3), cIm = new Float64Array(3);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      cRe[i] += modes.giRe[i * 3 + j] * lbr[j] - modes.giIm[i * 3 + j] * lbi[j];
      cIm[i] += modes.giRe[i * 3 + j] * lbi[j] + modes.giIm[i * 3 + j] * lbr[j];
    }
  // B0 = (1/2pi) Im A c
  const log: number[] = [0, 0, 0];
  for (let i = 0; i < 3; i++) {
    let si = 0;
    for (let j = 0; j < 3; j++) si += modes.aRe[i * 3 + j] * cIm[j] + modes.aIm[i * 3 + j] * cRe[j];
    log[i] = si / (2 * Math.PI);
  }
  // mean over a turn of (1/pi) Im A ln(cos w I + sin w T3) c = (1/pi) Im A ln((I - i T3)/2) c
  const v = new Float64Array(6);
  applyLog(v, 0.5, 0, 0, -0.5, modes.tRe, modes.tIm, modes.aRe, modes.aIm, cRe, cIm, modes.diagonal);
  const phiD = Math.atan2(dot(modes.m, fr.e2), dot(modes.m, fr.e1));
  const offset: Vec3 = [0, 1, 2].map((i) => (b[i] * phiD) / (2 * Math.PI) - v[2 * i + 1] / Math.PI) as unknown as Vec3;
  return { modes, cRe, cIm, logCoefficient: log as unknown as Vec3, offset };
}

const INV_PI = 1 / Math.PI;
const INV_2PI = 1 / (2 * Math.PI);

export function anisotropicDislocation(opts: AnisotropicDislocationOptions): DisplacementField {
  const P = finiteVec3(opts.point_nm, 'dislocation point_nm');
  const b = nonZeroVec3(opts.b_nm, 'dislocation b_nm');
  const bLen = norm(b);
  const rc = coreRadius(opts.coreRadius_nm, bLen, 'dislocation coreRadius_nm');
  const ln = anisotropicLine(opts);
  const { modes, cRe, cIm } = ln;
  const { tRe, tIm, aRe, aIm, diagonal } = modes;
  const fr = dislocationFrame(b, nonZeroVec3(opts.line, 'dislocation line'));
  const phiD = Math.atan2(dot(modes.m, fr.e2), dot(modes.m, fr.e1));
  const [mx, my, mz] = modes.m;
  const [nx, ny, nz] = modes.n;
  const px = P[0], py = P[1], pz = P[2];
  const [B0x, B0y, B0z] = ln.logCoefficient;
  const [O0, O1, O2] = ln.offset;
  const [bx, by, bz] = b;
  const rc2 = rc * rc;
  const rm2 = 4 * rc2;
  const rcm = rc2 / rm2;
  // T3 entries and AT = A T3
  const p0r = tRe[0], p0i = tIm[0], p1r = tRe[4], p1i = tIm[4], p2r = tRe[8], p2i = tIm[8];
  const t01r = tRe[1], t01i = tIm[1], t02r = tRe[2], t02i = tIm[2], t12r = tRe[5], t12i = tIm[5];
  const c0r = cRe[0], c0i = cIm[0], c1r = cRe[1], c1i = cIm[1], c2r = cRe[2], c2i = cIm[2];
  const ATr = new Float64Array(9), ATi = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let sr = 0, si = 0;
      for (let k = 0; k <= j; k++) {
        sr += aRe[i * 3 + k] * tRe[k * 3 + j] - aIm[i * 3 + k] * tIm[k * 3 + j];
        si += aRe[i * 3 + k] * tIm[k * 3 + j] + aIm[i * 3 + k] * tRe[k * 3 + j];
      }
      ATr[i * 3 + j] = sr;
      ATi[i * 3 + j] = si;
    }
  const v = new Float64Array(6);
  const y = new Float64Array(6);
  const grad = new Float64Array(9);
  // local coordinates (x1, x2) handed to solve and singularGradient: a double argument is boxed when V8
  // does not inline the call, and these run at every strain evaluation
  const xl = new Float64Array(2);

  /** y = (x1 I + x2 T3)^-1 c (back substitution), (x1, x2) = xl. */
  const solve = (): void => {
    const x1 = xl[0], x2 = xl[1];
    const z2r = x1 + x2 * p2r, z2i = x2 * p2i;
    let d = z2r * z2r + z2i * z2i;
    const y2r = (c2r * z2r + c2i * z2i) / d, y2i = (c2i * z2r - c2r * z2i) / d;
    const z1r = x1 + x2 * p1r, z1i = x2 * p1i;
    let nr = c1r - x2 * (t12r * y2r - t12i * y2i);
    let ni = c1i - x2 * (t12r * y2i + t12i * y2r);
    d = z1r * z1r + z1i * z1i;
    const y1r = (nr * z1r + ni * z1i) / d, y1i = (ni * z1r - nr * z1i) / d;
    const z0r = x1 + x2 * p0r, z0i = x2 * p0i;
    nr = c0r - x2 * (t01r * y1r - t01i * y1i + t02r * y2r - t02i * y2i);
    ni = c0i - x2 * (t01r * y1i + t01i * y1r + t02r * y2i + t02i * y2r);
    d = z0r * z0r + z0i * z0i;
    y[0] = (nr * z0r + ni * z0i) / d;
    y[1] = (ni * z0r - nr * z0i) / d;
    y[2] = y1r;
    y[3] = y1i;
    y[4] = y2r;
    y[5] = y2i;
  };

  /** The singular field's gradient (plain, no core) into grad, from the local coordinates in xl. */
  const singularGradient = (): void => {
    solve();
    for (let i = 0; i < 3; i++) {
      let ui = 0, vi = 0;
      for (let k = 0; k < 3; k++) {
        ui += aRe[i * 3 + k] * y[2 * k + 1] + aIm[i * 3 + k] * y[2 * k];
        vi += ATr[i * 3 + k] * y[2 * k + 1] + ATi[i * 3 + k] * y[2 * k];
      }
      ui *= INV_PI;
      vi *= INV_PI;
      grad[3 * i] = mx * ui + nx * vi;
      grad[3 * i + 1] = my * ui + ny * vi;
      grad[3 * i + 2] = mz * ui + nz * vi;
    }
  };

  /** Singular displacement incl. offset into v[0..2] (real parts). */
  const singularDisplacement = (x1: number, x2: number): void => {
    applyLog(v, x1, 0, x2, 0, tRe, tIm, aRe, aIm, cRe, cIm, diagonal);
    v[0] = v[1] * INV_PI + O0;
    v[1] = v[3] * INV_PI + O1;
    v[2] = v[5] * INV_PI + O2;
  };

  const B0 = Float64Array.of(B0x, B0y, B0z);
  const bb = Float64Array.of(bx, by, bz);
  const fullGradientAt = (out: Float64Array, p: Float64Array): void => {
    const x = p[0], yy = p[1], z = p[2];
    const dx = x - px, dy = yy - py, dz = z - pz;
    const x1 = mx * dx + my * dy + mz * dz;
    const x2 = nx * dx + ny * dy + nz * dz;
    const r2 = x1 * x1 + x2 * x2;
    if (r2 >= rm2) {
      xl[0] = x1;
      xl[1] = x2;
      singularGradient();
      for (let i = 0; i < 9; i++) out[i] = grad[i];
      return;
    }
    if (r2 === 0) {
      out.fill(0);
      return;
    }
    const o = 1 - r2 / rm2;
    const q = r2 + rc2 * o * o * o;
    const mq = 1 - 3 * rcm * o * o;
    const f = r2 / q;
    xl[0] = x1;
    xl[1] = x2;
    singularGradient();
    singularDisplacement(x1, x2);
    const lnr2 = Math.log(r2);
    const theta = phiD + Math.atan2(x2, x1);
    // grad rho^2 = 2 (x1 m + x2 n)
    const gx = 2 * (x1 * mx + x2 * nx), gy = 2 * (x1 * my + x2 * ny), gz = 2 * (x1 * mz + x2 * nz);
    const cq = mq / q; // grad ln q = cq grad rho^2
    const cf = (q - r2 * mq) / (q * q); // grad f = cf grad rho^2
    for (let i = 0; i < 3; i++) {
      // smooth angular part Psi = Phi - b theta/2pi, Phi = R_sing - B0 ln rho^2
      const psi = v[i] - B0[i] * lnr2 - bb[i] * theta * INV_2PI;
      const s = B0[i] * cq - (f * B0[i]) / r2 + psi * cf;
      out[3 * i] = f * grad[3 * i] + s * gx;
      out[3 * i + 1] = f * grad[3 * i + 1] + s * gy;
      out[3 * i + 2] = f * grad[3 * i + 2] + s * gz;
    }
  };

  return withDirectional({
    displacement(out, x, yy, z) {
      const dx = x - px, dy = yy - py, dz = z - pz;
      const x1 = mx * dx + my * dy + mz * dz;
      const x2 = nx * dx + ny * dy + nz * dz;
      const r2 = x1 * x1 + x2 * x2;
      if (r2 >= rm2) {
        singularDisplacement(x1, x2);
        out[0] = v[0];
        out[1] = v[1];
        out[2] = v[2];
        return;
      }
      const o = 1 - r2 / rm2;
      const q = r2 + rc2 * o * o * o;
      const lq = Math.log(q);
      if (r2 === 0) {
        out[0] = B0x * lq;
        out[1] = B0y * lq;
        out[2] = B0z * lq;
        return;
      }
      singularDisplacement(x1, x2);
      const f = r2 / q;
      const lr = Math.log(r2);
      out[0] = B0x * lq + f * (v[0] - B0x * lr);
      out[1] = B0y * lq + f * (v[1] - B0y * lr);
      out[2] = B0z * lq + f * (v[2] - B0z * lr);
    },
    gradientAt: fullGradientAt,
    directionalAt(g, kv) {
      // r = (g^T A)(m.k) + (g^T A T3)(n.k): value = (1/pi) Im r . (x1 I + x2 T3)^-1 c
      const mk = mx * kv[0] + my * kv[1] + mz * kv[2];
      const nk = nx * kv[0] + ny * kv[1] + nz * kv[2];
      const rr = [0, 0, 0], ri = [0, 0, 0];
      for (let k = 0; k < 3; k++)
        for (let i = 0; i < 3; i++) {
          rr[k] += g[i] * (mk * aRe[i * 3 + k] + nk * ATr[i * 3 + k]);
          ri[k] += g[i] * (mk * aIm[i * 3 + k] + nk * ATi[i * 3 + k]);
        }
      const g0 = g[0], g1 = g[1], g2 = g[2], k0 = kv[0], k1 = kv[1], k2 = kv[2];
      const pc = new Float64Array(3);
      const core = (x1: number, x2: number, x: number, yy: number, z: number): number => {
        pc[0] = x;
        pc[1] = yy;
        pc[2] = z;
        fullGradientAt(grad, pc);
        return (
          g0 * (grad[0] * k0 + grad[1] * k1 + grad[2] * k2) +
          g1 * (grad[3] * k0 + grad[4] * k1 + grad[5] * k2) +
          g2 * (grad[6] * k0 + grad[7] * k1 + grad[8] * k2)
        );
      };
      if (diagonal) {
        // s_a = r_a c_a / pi; value = sum Im(s_a / z_a)
        const s0r = (rr[0] * c0r - ri[0] * c0i) * INV_PI, s0i = (rr[0] * c0i + ri[0] * c0r) * INV_PI;
        const s1r = (rr[1] * c1r - ri[1] * c1i) * INV_PI, s1i = (rr[1] * c1i + ri[1] * c1r) * INV_PI;
        const s2r = (rr[2] * c2r - ri[2] * c2i) * INV_PI, s2i = (rr[2] * c2i + ri[2] * c2r) * INV_PI;
        // core only: g.R_sing = sum Im(w_a ln z_a) + g.offset, w_a = (g^T A)_a c_a / pi
        const ga = [0, 0, 0], gai = [0, 0, 0];
        for (let a = 0; a < 3; a++) for (let i = 0; i < 3; i++) {
          ga[a] += g[i] * aRe[i * 3 + a];
          gai[a] += g[i] * aIm[i * 3 + a];
        }
        const w0r = (ga[0] * c0r - gai[0] * c0i) * INV_PI, w0i = (ga[0] * c0i + gai[0] * c0r) * INV_PI;
        const w1r = (ga[1] * c1r - gai[1] * c1i) * INV_PI, w1i = (ga[1] * c1i + gai[1] * c1r) * INV_PI;
        const w2r = (ga[2] * c2r - gai[2] * c2i) * INV_PI, w2i = (ga[2] * c2i + gai[2] * c2r) * INV_PI;
        const gB0 = g0 * B0x + g1 * B0y + g2 * B0z;
        const gb = g0 * bx + g1 * by + g2 * bz;
        const gO = g0 * O0 + g1 * O1 + g2 * O2;
        return (p) => {
          const x = p[0], yy = p[1], z = p[2];
          const dx = x - px, dy = yy - py, dz = z - pz;
          const x1 = mx * dx + my * dy + mz * dz;
          const x2 = nx * dx + ny * dy + nz * dz;
          const r2 = x1 * x1 + x2 * x2;
          const z0r = x1 + x2 * p0r, z0i = x2 * p0i;
          const z1r = x1 + x2 * p1r, z1i = x2 * p1i;
          const z2r = x1 + x2 * p2r, z2i = x2 * p2i;
          const a0 = z0r * z0r + z0i * z0i, a1 = z1r * z1r + z1i * z1i, a2 = z2r * z2r + z2i * z2i;
          if (r2 >= rm2) {
            p[3] = (s0i * z0r - s0r * z0i) / a0 + (s1i * z1r - s1r * z1i) / a1 + (s2i * z2r - s2r * z2i) / a2;
            return;
          }
          // inside the core: the same terms as fullGradient, contracted with g and k
          if (r2 === 0) {
            p[3] = 0;
            return;
          }
          const sing = (s0i * z0r - s0r * z0i) / a0 + (s1i * z1r - s1r * z1i) / a1 + (s2i * z2r - s2r * z2i) / a2;
          const gR =
            0.5 * (w0i * Math.log(a0) + w1i * Math.log(a1) + w2i * Math.log(a2)) +
            w0r * Math.atan2(z0i, z0r) + w1r * Math.atan2(z1i, z1r) + w2r * Math.atan2(z2i, z2r) + gO;
          const o = 1 - r2 / rm2;
          const q = r2 + rc2 * o * o * o;
          const mq = 1 - 3 * rcm * o * o;
          const f = r2 / q;
          const psi = gR - gB0 * Math.log(r2) - gb * (phiD + Math.atan2(x2, x1)) * INV_2PI;
          const kr = 2 * (x1 * mk + x2 * nk); // grad(rho^2) . k
          p[3] = f * sing + kr * (gB0 * (mq / q) - (f * gB0) / r2 + psi * ((q - r2 * mq) / (q * q)));
        };
      }
      const r0r = rr[0] * INV_PI, r0i = ri[0] * INV_PI, r1r = rr[1] * INV_PI, r1i = ri[1] * INV_PI, r2r = rr[2] * INV_PI, r2i = ri[2] * INV_PI;
      return (p) => {
        const x = p[0], yy = p[1], z = p[2];
        const dx = x - px, dy = yy - py, dz = z - pz;
        const x1 = mx * dx + my * dy + mz * dz;
        const x2 = nx * dx + ny * dy + nz * dz;
        if (x1 * x1 + x2 * x2 < rm2) {
          p[3] = core(x1, x2, x, yy, z);
          return;
        }
        xl[0] = x1;
        xl[1] = x2;
        solve();
        p[3] = r0r * y[1] + r0i * y[0] + r1r * y[3] + r1i * y[2] + r2r * y[5] + r2i * y[4];
      };
    },
  });
}
