/**
 * Eigenvalues and right eigenvectors of a general complex n x n matrix, and
 * the inverse of a complex matrix (LU with partial pivoting).
 *
 * Method (Golub & Van Loan, Matrix Computations, 4th ed., ch. 7):
 *   1. unitary reduction to upper Hessenberg form with Householder
 *      reflections, H = Q^H A Q;
 *   2. complex single-shift QR iterations with the Wilkinson shift (the
 *      eigenvalue of the trailing 2 x 2 block closer to its last diagonal
 *      element; an exceptional shift every 10 iterations without deflation)
 *      using Givens rotations, to the Schur form T = Z^H A Z;
 *   3. eigenvectors of T by back-substitution, transformed back with Z and
 *      normalised to unit 2-norm.
 *
 * Storage: matrices are row-major with separate real and imaginary
 * Float64Arrays (element (i, j) at i * n + j). The eigenvector matrix holds
 * eigenvector j in COLUMN j.
 *
 * Meant for the small matrices of the many-beam equations (n up to ~ 40);
 * the cost is O(n^3).
 */

export interface ComplexEigenResult {
  readonly n: number;
  /** eigenvalues, real and imaginary parts */
  readonly valuesRe: Float64Array;
  readonly valuesIm: Float64Array;
  /** eigenvector j in column j (row-major n x n), unit 2-norm */
  readonly vectorsRe: Float64Array;
  readonly vectorsIm: Float64Array;
}

const EPS = 2.220446049250313e-16;

function abs1(re: number, im: number): number {
  return Math.abs(re) + Math.abs(im);
}

/**
 * Reduce the n x n matrix (hr, hi) in place to upper Hessenberg form and
 * accumulate the unitary transformation in (qr, qi) (initialised here).
 */
function toHessenberg(n: number, hr: Float64Array, hi: Float64Array, qr: Float64Array, qi: Float64Array): void {
  qr.fill(0);
  qi.fill(0);
  for (let i = 0; i < n; i++) qr[i * n + i] = 1;
  const vr = new Float64Array(n);
  const vi = new Float64Array(n);
  for (let k = 0; k < n - 2; k++) {
    // x = H[k+1.., k]
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) {
      const a = hr[i * n + k];
      const b = hi[i * n + k];
      norm2 += a * a + b * b;
    }
    const x0r = hr[(k + 1) * n + k];
    const x0i = hi[(k + 1) * n + k];
    const x0abs = Math.hypot(x0r, x0i);
    const norm = Math.sqrt(norm2);
    if (norm === 0 || norm2 - x0abs * x0abs <= EPS * EPS * norm2) continue; // already reduced
    // alpha = -e^{i arg x0} ||x||; v = x - alpha e1
    const pr = x0abs === 0 ? 1 : x0r / x0abs;
    const pi = x0abs === 0 ? 0 : x0i / x0abs;
    const alphaR = -pr * norm;
    const alphaI = -pi * norm;
    vr.fill(0);
    vi.fill(0);
    let vnorm2 = 0;
    for (let i = k + 1; i < n; i++) {
      let a = hr[i * n + k];
      let b = hi[i * n + k];
      if (i === k + 1) {
        a -= alphaR;
        b -= alphaI;
      }
      vr[i] = a;
      vi[i] = b;
      vnorm2 += a * a + b * b;
    }
    const vs = 1 / Math.sqrt(vnorm2);
    for (let i = k + 1; i < n; i++) {
      vr[i] *= vs;
      vi[i] *= vs;
    }
    // Left: H = (I - 2 v v^H) H, columns k..n-1
    for (let j = k; j < n; j++) {
      let sr = 0;
      let si = 0; // s = v^H H[:, j]
      for (let i = k + 1; i < n; i++) {
        const a = hr[i * n + j];
        const b = hi[i * n + j];
        sr += vr[i] * a + vi[i] * b;
        si += vr[i] * b - vi[i] * a;
      }
      sr *= 2;
      si *= 2;
      for (let i = k + 1; i < n; i++) {
        hr[i * n + j] -= vr[i] * sr - vi[i] * si;
        hi[i * n + j] -= vr[i] * si + vi[i] * sr;
      }
    }
    // Right: H = H (I - 2 v v^H), all rows; same for Q
    for (let pass = 0; pass < 2; pass++) {
      const mr = pass === 0 ? hr : qr;
      const mi = pass === 0 ? hi : qi;
      for (let i = 0; i < n; i++) {
        let sr = 0;
        let si = 0; // s = M[i, :] v
        for (let j = k + 1; j < n; j++) {
          const a = mr[i * n + j];
          const b = mi[i * n + j];
          sr += a * vr[j] - b * vi[j];
          si += a * vi[j] + b * vr[j];
        }
        sr *= 2;
        si *= 2;
        for (let j = k + 1; j < n; j++) {
          // M[i, j] -= s conj(v_j)
          mr[i * n + j] -= sr * vr[j] + si * vi[j];
          mi[i * n + j] -= si * vr[j] - sr * vi[j];
        }
      }
    }
    // exact zeros below the subdiagonal of column k
    hr[(k + 1) * n + k] = alphaR;
    hi[(k + 1) * n + k] = alphaI;
    for (let i = k + 2; i < n; i++) {
      hr[i * n + k] = 0;
      hi[i * n + k] = 0;
    }
  }
}

/**
 * Complex Schur form of an upper Hessenberg matrix by shifted QR with Givens
 * rotations. (hr, hi) becomes upper triangular; (zr, zi) is multiplied on the
 * right by the accumulated rotations.
 */
function hessenbergToSchur(n: number, hr: Float64Array, hi: Float64Array, zr: Float64Array, zi: Float64Array): void {
  const cs = new Float64Array(n);
  const snr = new Float64Array(n);
  const sni = new Float64Array(n);
  let m = n - 1;
  let iter = 0;
  let totalIter = 0;
  const maxTotal = 60 * n + 60;
  while (m > 0) {
    // find the start l of the active unreduced block ending at m
    let l = m;
    for (; l > 0; l--) {
      const sub = abs1(hr[l * n + l - 1], hi[l * n + l - 1]);
      let ref = abs1(hr[(l - 1) * n + l - 1], hi[(l - 1) * n + l - 1]) + abs1(hr[l * n + l], hi[l * n + l]);
      if (ref === 0) {
        // fall back on the neighbouring elements of the block
        ref = abs1(hr[(l - 1) * n + l], hi[(l - 1) * n + l]);
        if (l + 1 < n) ref += abs1(hr[(l + 1) * n + l], hi[(l + 1) * n + l]);
      }
      if (sub <= EPS * ref) {
        hr[l * n + l - 1] = 0;
        hi[l * n + l - 1] = 0;
        break;
      }
    }
    if (l === m) {
      m--;
      iter = 0;
      continue;
    }
    iter++;
    totalIter++;
    if (totalIter > maxTotal) {
      throw new Error('complexEigen: the QR iteration did not converge');
    }
    // shift
    let mur: number;
    let mui: number;
    const dr = hr[m * n + m];
    const di = hi[m * n + m];
    if (iter % 10 === 0) {
      // exceptional shift (breaks rare cycles)
      let s = abs1(hr[m * n + m - 1], hi[m * n + m - 1]);
      if (m >= 2) s += abs1(hr[(m - 1) * n + m - 2], hi[(m - 1) * n + m - 2]);
      mur = dr + 0.75 * s;
      mui = di;
    } else {
      const ar = hr[(m - 1) * n + m - 1];
      const ai = hi[(m - 1) * n + m - 1];
      const br = hr[(m - 1) * n + m];
      const bi = hi[(m - 1) * n + m];
      const cr = hr[m * n + m - 1];
      const ci = hi[m * n + m - 1];
      // p = (a - d)/2, bc = b c, disc = sqrt(p^2 + bc)
      const pr = 0.5 * (ar - dr);
      const pi = 0.5 * (ai - di);
      const bcr = br * cr - bi * ci;
      const bci = br * ci + bi * cr;
      const qr = pr * pr - pi * pi + bcr;
      const qi = 2 * pr * pi + bci;
      // complex sqrt of (qr, qi)
      const qa = Math.hypot(qr, qi);
      let sr = Math.sqrt(0.5 * (qa + qr));
      let si = Math.sqrt(0.5 * Math.max(qa - qr, 0));
      if (qi < 0) si = -si;
      if (pr * sr + pi * si < 0) {
        sr = -sr;
        si = -si;
      }
      const denr = pr + sr;
      const deni = pi + si;
      const den2 = denr * denr + deni * deni;
      if (den2 === 0) {
        mur = dr;
        mui = di;
      } else {
        // mu = d - bc / (p + disc)
        mur = dr - (bcr * denr + bci * deni) / den2;
        mui = di - (bci * denr - bcr * deni) / den2;
      }
    }
    // explicit shifted QR step on the block l..m
    for (let i = l; i <= m; i++) {
      hr[i * n + i] -= mur;
      hi[i * n + i] -= mui;
    }
    for (let k = l; k < m; k++) {
      const ar = hr[k * n + k];
      const ai = hi[k * n + k];
      const br = hr[(k + 1) * n + k];
      const bi = hi[(k + 1) * n + k];
      const aa = Math.hypot(ar, ai);
      const ba = Math.hypot(br, bi);
      const nrm = Math.hypot(aa, ba);
      let c: number;
      let sr: number;
      let si: number;
      if (nrm === 0) {
        c = 1;
        sr = 0;
        si = 0;
      } else if (aa === 0) {
        c = 0;
        sr = 1;
        si = 0;
      } else {
        c = aa / nrm;
        // s = (a/|a|) conj(b) / nrm
        const ur = ar / aa;
        const ui = ai / aa;
        sr = (ur * br + ui * bi) / nrm;
        si = (ui * br - ur * bi) / nrm;
      }
      cs[k] = c;
      snr[k] = sr;
      sni[k] = si;
      // rows k, k+1, columns k..n-1: [x; y] <- [c x + s y; -conj(s) x + c y]
      for (let j = k; j < n; j++) {
        const xr = hr[k * n + j];
        const xi = hi[k * n + j];
        const yr = hr[(k + 1) * n + j];
        const yi = hi[(k + 1) * n + j];
        hr[k * n + j] = c * xr + sr * yr - si * yi;
        hi[k * n + j] = c * xi + sr * yi + si * yr;
        hr[(k + 1) * n + j] = -(sr * xr + si * xi) + c * yr;
        hi[(k + 1) * n + j] = -(sr * xi - si * xr) + c * yi;
      }
      hr[(k + 1) * n + k] = 0;
      hi[(k + 1) * n + k] = 0;
    }
    for (let k = l; k < m; k++) {
      const c = cs[k];
      const sr = snr[k];
      const si = sni[k];
      // columns k, k+1: [x, y] <- [c x + conj(s) y, -s x + c y]
      const rowEnd = Math.min(k + 1, m);
      for (let pass = 0; pass < 2; pass++) {
        const mr = pass === 0 ? hr : zr;
        const mi = pass === 0 ? hi : zi;
        const last = pass === 0 ? rowEnd : n - 1;
        for (let i = 0; i <= last; i++) {
          const xr = mr[i * n + k];
          const xi = mi[i * n + k];
          const yr = mr[i * n + k + 1];
          const yi = mi[i * n + k + 1];
          mr[i * n + k] = c * xr + sr * yr + si * yi;
          mi[i * n + k] = c * xi + sr * yi - si * yr;
          mr[i * n + k + 1] = -(sr * xr - si * xi) + c * yr;
          mi[i * n + k + 1] = -(sr * xi + si * xr) + c * yi;
        }
      }
    }
    for (let i = l; i <= m; i++) {
      hr[i * n + i] += mur;
      hi[i * n + i] += mui;
    }
  }
}

/** Complex Schur form A = Z T Z^H: T upper triangular, Z unitary (both row-major n x n). */
export interface ComplexSchurResult {
  readonly n: number;
  readonly tRe: Float64Array;
  readonly tIm: Float64Array;
  readonly zRe: Float64Array;
  readonly zIm: Float64Array;
}

/**
 * Complex Schur decomposition of the n x n matrix (aRe, aIm) (row-major; not
 * modified): steps 1 and 2 above. The eigenvalues are the diagonal of T in no
 * particular order.
 */
export function complexSchur(n: number, aRe: Float64Array, aIm: Float64Array): ComplexSchurResult {
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`complexEigen: n must be a positive integer, got ${n}`);
  if (aRe.length < n * n || aIm.length < n * n) throw new RangeError('complexEigen: matrix arrays are shorter than n*n');
  const hr = Float64Array.from(aRe.subarray(0, n * n));
  const hi = Float64Array.from(aIm.subarray(0, n * n));
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(hr[i]) || !Number.isFinite(hi[i])) {
      throw new RangeError('complexEigen: the matrix contains NaN or Infinity');
    }
  }
  const zr = new Float64Array(n * n);
  const zi = new Float64Array(n * n);
  toHessenberg(n, hr, hi, zr, zi);
  hessenbergToSchur(n, hr, hi, zr, zi);
  return { n, tRe: hr, tIm: hi, zRe: zr, zIm: zi };
}

/**
 * Eigenvalues and right eigenvectors of the complex n x n matrix (aRe, aIm)
 * (row-major; not modified). Eigenvalues are returned in the order in which
 * they appear on the diagonal of the Schur form (no sorting).
 */
export function complexEigen(n: number, aRe: Float64Array, aIm: Float64Array): ComplexEigenResult {
  const { tRe: hr, tIm: hi, zRe: zr, zIm: zi } = complexSchur(n, aRe, aIm);

  const valuesRe = new Float64Array(n);
  const valuesIm = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    valuesRe[i] = hr[i * n + i];
    valuesIm[i] = hi[i * n + i];
  }
  // norm of T, for the small-denominator guard
  let tnorm = 0;
  for (let i = 0; i < n * n; i++) tnorm = Math.max(tnorm, abs1(hr[i], hi[i]));
  const smin = Math.max(tnorm * EPS * n, Number.MIN_VALUE * 1e10);

  // eigenvectors of T (upper triangular) by back-substitution
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  const vectorsRe = new Float64Array(n * n);
  const vectorsIm = new Float64Array(n * n);
  for (let k = 0; k < n; k++) {
    xr.fill(0);
    xi.fill(0);
    xr[k] = 1;
    const lr = valuesRe[k];
    const li = valuesIm[k];
    for (let i = k - 1; i >= 0; i--) {
      let numr = 0;
      let numi = 0;
      for (let j = i + 1; j <= k; j++) {
        const tr = hr[i * n + j];
        const ti = hi[i * n + j];
        numr += tr * xr[j] - ti * xi[j];
        numi += tr * xi[j] + ti * xr[j];
      }
      let denr = hr[i * n + i] - lr;
      let deni = hi[i * n + i] - li;
      if (abs1(denr, deni) < smin) {
        if (abs1(numr, numi) <= 100 * smin) {
          // an (numerically) exactly degenerate eigenvalue whose Schur
          // coupling vanishes: keep the eigenvectors independent
          xr[i] = 0;
          xi[i] = 0;
          continue;
        }
        denr = smin;
        deni = 0;
      }
      const d2 = denr * denr + deni * deni;
      // x_i = -num / den
      xr[i] = -(numr * denr + numi * deni) / d2;
      xi[i] = -(numi * denr - numr * deni) / d2;
    }
    // v = Z x, normalised
    let norm2 = 0;
    for (let r = 0; r < n; r++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j <= k; j++) {
        const a = zr[r * n + j];
        const b = zi[r * n + j];
        sr += a * xr[j] - b * xi[j];
        si += a * xi[j] + b * xr[j];
      }
      vectorsRe[r * n + k] = sr;
      vectorsIm[r * n + k] = si;
      norm2 += sr * sr + si * si;
    }
    const s = 1 / Math.sqrt(norm2);
    for (let r = 0; r < n; r++) {
      vectorsRe[r * n + k] *= s;
      vectorsIm[r * n + k] *= s;
    }
  }
  return { n, valuesRe, valuesIm, vectorsRe, vectorsIm };
}

/**
 * Inverse of the complex n x n matrix (aRe, aIm) by LU decomposition with
 * partial pivoting, written into (outRe, outIm). Throws when the matrix is
 * singular to working precision.
 */
export function complexInverse(
  outRe: Float64Array,
  outIm: Float64Array,
  n: number,
  aRe: Float64Array,
  aIm: Float64Array,
): void {
  const lr = Float64Array.from(aRe.subarray(0, n * n));
  const li = Float64Array.from(aIm.subarray(0, n * n));
  const perm = new Int32Array(n);
  for (let i = 0; i < n; i++) perm[i] = i;
  let anorm = 0;
  for (let i = 0; i < n * n; i++) anorm = Math.max(anorm, abs1(lr[i], li[i]));
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = abs1(lr[k * n + k], li[k * n + k]);
    for (let i = k + 1; i < n; i++) {
      const v = abs1(lr[i * n + k], li[i * n + k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (best <= anorm * EPS * 1e-2 || best === 0) {
      throw new Error('complexInverse: the matrix is singular to working precision');
    }
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        let t = lr[k * n + j];
        lr[k * n + j] = lr[p * n + j];
        lr[p * n + j] = t;
        t = li[k * n + j];
        li[k * n + j] = li[p * n + j];
        li[p * n + j] = t;
      }
      const t = perm[k];
      perm[k] = perm[p];
      perm[p] = t;
    }
    const pr = lr[k * n + k];
    const pim = li[k * n + k];
    const p2 = pr * pr + pim * pim;
    for (let i = k + 1; i < n; i++) {
      // l = a_ik / a_kk
      const ar = lr[i * n + k];
      const ai = li[i * n + k];
      const fr = (ar * pr + ai * pim) / p2;
      const fi = (ai * pr - ar * pim) / p2;
      lr[i * n + k] = fr;
      li[i * n + k] = fi;
      for (let j = k + 1; j < n; j++) {
        const br = lr[k * n + j];
        const bi = li[k * n + j];
        lr[i * n + j] -= fr * br - fi * bi;
        li[i * n + j] -= fr * bi + fi * br;
      }
    }
  }
  // solve L U X = P I, column by column
  const cr = new Float64Array(n);
  const ci = new Float64Array(n);
  for (let col = 0; col < n; col++) {
    for (let i = 0; i < n; i++) {
      cr[i] = perm[i] === col ? 1 : 0;
      ci[i] = 0;
    }
    for (let i = 1; i < n; i++) {
      let sr = cr[i];
      let si = ci[i];
      for (let j = 0; j < i; j++) {
        const a = lr[i * n + j];
        const b = li[i * n + j];
        sr -= a * cr[j] - b * ci[j];
        si -= a * ci[j] + b * cr[j];
      }
      cr[i] = sr;
      ci[i] = si;
    }
    for (let i = n - 1; i >= 0; i--) {
      let sr = cr[i];
      let si = ci[i];
      for (let j = i + 1; j < n; j++) {
        const a = lr[i * n + j];
        const b = li[i * n + j];
        sr -= a * cr[j] - b * ci[j];
        si -= a * ci[j] + b * cr[j];
      }
      const pr = lr[i * n + i];
      const pim = li[i * n + i];
      const p2 = pr * pr + pim * pim;
      cr[i] = (sr * pr + si * pim) / p2;
      ci[i] = (si * pr - sr * pim) / p2;
    }
    for (let i = 0; i < n; i++) {
      outRe[i * n + col] = cr[i];
      outIm[i * n + col] = ci[i];
    }
  }
}
