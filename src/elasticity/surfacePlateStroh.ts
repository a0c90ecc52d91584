/**
 * Exact anisotropic plate correction of a straight dislocation parallel to the
 * foil surfaces (Stroh formalism, generalised plane strain: all three
 * displacement components): the field that, added to the infinite-medium Stroh
 * field (anisotropicDislocation.ts), frees BOTH surfaces y = 0 and y = t of
 * traction at every point, however far from the line.
 *
 * Frame: x = m.(r - P) with m = n x u across the line, y = n.r the depth, line
 * along u; vectors (A, tractions, gradients) stay in crystal Cartesian
 * components. The same construction as the isotropic surfacePlateEdge.ts:
 *
 * 1. The two Stroh half-space images (surfaceImagesStroh.ts): each frees its own
 *    surface exactly and carries the near-surface singular part; on the OTHER
 *    surface it leaves the traction (1/pi) Im sum_ab tau_a C_ab / (x - s_ab),
 *    tau_a = (Q + p_a T) A_a the traction vector of mode a on a plane y = const
 *    (Q_ik = C_ijkl n_j m_l, T_ik = C_ijkl n_j n_l), poles s_ab at least t Im p
 *    from that surface.
 * 2. Fourier transform in x (f^(k) = int f e^{-ikx} dx, f = (1/pi) Re int_0^inf f^ e^{ikx} dk):
 *    for k > 0, (1/pi) Im c/(x - s) has the transform -c e^{-iks} if Im s < 0 and
 *    conj(c) e^{-ik conj(s)} if Im s > 0 (residues). The traction-free strip
 *    0 < y < t loaded with minus the two leftover tractions: six modes
 *    A_a e^{ik(x + p_a y)} and conj(A_a) e^{ik(x + conj(p_a)(y - t))} (the second set
 *    referred to y = t so that nothing grows), their tractions ik tau_a e^{...},
 *    ik conj(tau_a) e^{...}: a 6 x 6 complex system per k (Gaussian elimination,
 *    partial pivoting) for the three traction components on both surfaces.
 * 3. k -> 0: far from the line a free plate with a dislocation is two rigid
 *    halves turned against each other by the kink Delta omega (rotation about u).
 *    Betti's reciprocity with the exact pure-bending state of the anisotropic
 *    plate in generalised plane strain (sigma_xx = c (y - t/2), sigma_xz = lambda
 *    sigma_xx, sigma_zz fixed by eps_zz = 0, everything else zero; lambda from the
 *    compliances: [S_11 S_13 S_15; S_31 S_33 S_35; S_51 S_53 S_55] (sigma_xx, sigma_zz,
 *    sigma_xz) = (eps_xx, 0, 0), frame (m, n, u), Voigt) gives
 *      Delta omega = -6 (b.m + lambda b.u) d (t - d) / t^3
 *    (isotropic: lambda = 0, the beam value of surfacePlateEdge.ts). The far halves
 *    have no other relative rigid motion that the gradient sees (out-of-plane
 *    rotations are not invariant along the line; the stresses vanish far away, so
 *    the strains do). The rotation's pole -i Delta omega e^{-kt}/k is taken off the
 *    spectrum of the gradient and added back as (Delta omega/pi) atan(x/t)
 *    (test/elasticity/surfacePlateStroh.test.ts checks Delta omega against
 *    -k Im omega^(k) at small k). Gauss-Legendre panels in k up to
 *    k t = 36 / min Im p (the loads fall as e^{-k t Im p}).
 *    Convention as surfacePlateEdge.ts: no rotation at the line, far halves turned
 *    by -+ Delta omega / 2, displacement zero at the line.
 * 4. Table: the residual's six gradient components (u_i,x and u_i,y, i Cartesian)
 *    and their x, y, xy derivatives on |x| <= X, 0 <= y <= t (t/24 steps),
 *    bicubic Hermite; beyond X the correction is minus the infinite field plus
 *    the rigid turn +-Delta omega/2 (X = 6 t / sqrt(min(1, min Im p)); mismatch at the
 *    seam measured in the tests).
 *
 * The displacement (tests and tools only) is the path integral of the gradient
 * from the line (Gauss-Legendre on the straight segment, inside the foil).
 */
import { type Vec3, dot, unit } from '../math/vec3.js';
import { gaussLegendre } from '../math/gaussLegendre.js';
import { type HermiteGrid, hermiteGrid } from '../math/hermiteGrid.js';
import { type DirectionalProbe, type DisplacementField, directionalProbe, withDirectional } from './field.js';
import { stiffnessTensor } from './stiffness.js';
import { anisotropicDislocation } from './anisotropicDislocation.js';
import { type StrohImagesOptions, strohHalfSpaceImages, strohImageCoefficients } from './surfaceImagesStroh.js';

/** The line and foil of the half-space images; the stiffness must have well separated Stroh eigenvalues for this line (strohImagesApply). */
export type PlateStrohOptions = Omit<StrohImagesOptions, 'only'>;

/** Numerical parameters (in units of the thickness t). */
export const PLATE_STROH_GRID = {
  /**
   * Half-width of the tabulated x range, divided by sqrt(min(1, min Im p)) (a margin: the seam is measured in the tests).
   * The strip's own terms settle over a length that grows with the LARGEST Im p, so orientations with max Im p near 2
   * (Pb, NiAl, Zn [100] in a [001] foil) leave a seam of 1e-6 to 6e-6 of b/(2 pi t) (a review's measurement; about
   * 1e-9 in beta'); a range of 6 t max(1, max Im p) would remove it at about twice the table time.
   */
  xRange: 6,
  /** Grid steps per thickness, in x and in y. */
  perThickness: 24,
  /** Upper end of the k integral (k t), divided by min Im p. */
  kMax: 36,
  /** Width of one Gauss-Legendre panel in k t, and its order. */
  panel: 1.5,
  order: 16,
} as const;

/** The plate problem of one line. */
export interface PlateStrohProblem {
  readonly t: number;
  readonly d: number;
  readonly m: Vec3;
  readonly n: Vec3;
  readonly u: Vec3;
  readonly pRe: Float64Array;
  readonly pIm: Float64Array;
  /** A: row i Cartesian, column mode. */
  readonly aRe: Float64Array;
  readonly aIm: Float64Array;
  /** tau_a = (Q + p_a T) A_a: row i, column mode. */
  readonly tauRe: Float64Array;
  readonly tauIm: Float64Array;
  /** Load coefficients c_ab = tau_a C_ab: index 3 (3 a + b) + i. */
  readonly cRe: Float64Array;
  readonly cIm: Float64Array;
  /** sigma_xz / sigma_xx of the pure-bending state. */
  readonly lambda: number;
  /** Delta omega = omega(+inf) - omega(-inf) (rad), rotation about u. */
  readonly kink: number;
  readonly minImP: number;
}

/** sigma_xz / sigma_xx in the pure bending of the plate (frame x = m, y = n, z = u), from the compliances. */
export function plateBendingRatio(stiffness_GPa: readonly number[], m: Vec3, n: Vec3, u: Vec3): number {
  const C = stiffnessTensor(stiffness_GPa);
  const R = [m, n, u];
  const pairs = [[0, 0], [1, 1], [2, 2], [1, 2], [0, 2], [0, 1]];
  const rot = (p: number, q: number, r: number, s: number): number => {
    let acc = 0;
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++)
        for (let k = 0; k < 3; k++)
          for (let l = 0; l < 3; l++) acc += R[p][i] * R[q][j] * R[r][k] * R[s][l] * C[((i * 3 + j) * 3 + k) * 3 + l];
    return acc;
  };
  const V: number[][] = pairs.map(([p, q]) => pairs.map(([r, s]) => rot(p, q, r, s)));
  const S = invReal(V);
  const idx = [0, 2, 4];
  const Q = invReal(idx.map((a) => idx.map((b) => S[a][b])));
  return Q[2][0] / Q[0][0];
}

function invReal(M: number[][]): number[][] {
  const n = M.length;
  const a = M.map((r, i) => [...r, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[piv][c])) piv = r;
    [a[c], a[piv]] = [a[piv], a[c]];
    const d = a[c][c];
    for (let j = 0; j < 2 * n; j++) a[c][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      if (f !== 0) for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((r) => r.slice(n));
}

export function plateStrohProblem(o: PlateStrohOptions): PlateStrohProblem {
  const n = unit(o.normal);
  const u = unit(o.line);
  const { modes, Cr, Ci } = strohImageCoefficients(o.b_nm, u, n, o.stiffness_GPa);
  const m = modes.m;
  const C = stiffnessTensor(o.stiffness_GPa);
  const Q = new Float64Array(9), T = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let k = 0; k < 3; k++) {
      let q = 0, tt = 0;
      for (let j = 0; j < 3; j++)
        for (let l = 0; l < 3; l++) {
          const c = C[((i * 3 + j) * 3 + k) * 3 + l];
          q += c * n[j] * m[l];
          tt += c * n[j] * n[l];
        }
      Q[i * 3 + k] = q;
      T[i * 3 + k] = tt;
    }
  const { aRe, aIm, pRe, pIm } = modes;
  const tauRe = new Float64Array(9), tauIm = new Float64Array(9);
  for (let i = 0; i < 3; i++)
    for (let a = 0; a < 3; a++) {
      let r = 0, im = 0;
      for (let k = 0; k < 3; k++) {
        // (Q_ik + p_a T_ik) A_ka
        const mr = Q[i * 3 + k] + pRe[a] * T[i * 3 + k], mi = pIm[a] * T[i * 3 + k];
        r += mr * aRe[k * 3 + a] - mi * aIm[k * 3 + a];
        im += mr * aIm[k * 3 + a] + mi * aRe[k * 3 + a];
      }
      tauRe[i * 3 + a] = r;
      tauIm[i * 3 + a] = im;
    }
  const cRe = new Float64Array(27), cIm = new Float64Array(27);
  for (let a = 0; a < 3; a++)
    for (let b = 0; b < 3; b++)
      for (let i = 0; i < 3; i++) {
        const xr = tauRe[i * 3 + a], xi = tauIm[i * 3 + a], yr = Cr[a * 3 + b], yi = Ci[a * 3 + b];
        cRe[3 * (3 * a + b) + i] = xr * yr - xi * yi;
        cIm[3 * (3 * a + b) + i] = xr * yi + xi * yr;
      }
  const t = o.thickness_nm;
  const d = dot(o.point_nm, n);
  const lambda = plateBendingRatio(o.stiffness_GPa, m, n, u);
  const kink = (-6 * (dot(o.b_nm, m) + lambda * dot(o.b_nm, u)) * d * (t - d)) / (t * t * t);
  const minImP = Math.min(pIm[0], pIm[1], pIm[2]);
  return { t, d, m, n, u, pRe: Float64Array.from(pRe), pIm: Float64Array.from(pIm), aRe: Float64Array.from(aRe), aIm: Float64Array.from(aIm), tauRe, tauIm, cRe, cIm, lambda, kink, minImP };
}

/** Solve the n x n complex system M z = r in place (row-major, interleaved Re/Im; partial pivoting). */
function csolve(n: number, M: Float64Array, r: Float64Array): void {
  for (let c = 0; c < n; c++) {
    let piv = c, best = -1;
    for (let row = c; row < n; row++) {
      const q = 2 * (row * n + c);
      const v = M[q] * M[q] + M[q + 1] * M[q + 1];
      if (v > best) { best = v; piv = row; }
    }
    if (piv !== c) {
      for (let j = 0; j < 2 * n; j++) { const s = M[2 * c * n + j]; M[2 * c * n + j] = M[2 * piv * n + j]; M[2 * piv * n + j] = s; }
      for (let j = 0; j < 2; j++) { const s = r[2 * c + j]; r[2 * c + j] = r[2 * piv + j]; r[2 * piv + j] = s; }
    }
    const q = 2 * (c * n + c);
    const den = M[q] * M[q] + M[q + 1] * M[q + 1];
    const ir = M[q] / den, ii = -M[q + 1] / den;
    for (let row = c + 1; row < n; row++) {
      const o = 2 * (row * n + c);
      const fr = M[o] * ir - M[o + 1] * ii, fi = M[o] * ii + M[o + 1] * ir;
      if (fr === 0 && fi === 0) continue;
      for (let j = c; j < n; j++) {
        const a = 2 * (row * n + j), b = 2 * (c * n + j);
        M[a] -= fr * M[b] - fi * M[b + 1];
        M[a + 1] -= fr * M[b + 1] + fi * M[b];
      }
      r[2 * row] -= fr * r[2 * c] - fi * r[2 * c + 1];
      r[2 * row + 1] -= fr * r[2 * c + 1] + fi * r[2 * c];
    }
  }
  for (let c = n - 1; c >= 0; c--) {
    let sr = r[2 * c], si = r[2 * c + 1];
    for (let j = c + 1; j < n; j++) {
      const a = 2 * (c * n + j);
      sr -= M[a] * r[2 * j] - M[a + 1] * r[2 * j + 1];
      si -= M[a] * r[2 * j + 1] + M[a + 1] * r[2 * j];
    }
    const q = 2 * (c * n + c);
    const den = M[q] * M[q] + M[q + 1] * M[q + 1];
    r[2 * c] = (sr * M[q] + si * M[q + 1]) / den;
    r[2 * c + 1] = (si * M[q] - sr * M[q + 1]) / den;
  }
}

/**
 * The residual's spectrum at one k > 0 for the depths ys[j]: per depth 24 reals, 12 complex numbers: the six
 * gradient components (u_0,x, u_1,x, u_2,x, u_0,y, u_1,y, u_2,y; Cartesian i, local x and y), then their
 * y-derivatives. With `pole` (default) the rotation pole -i kink e^{-kt}/k is taken off (the caller adds back
 * (kink/pi) atan(x/t)); without it the raw spectrum (tests: its k -> 0 limit against the beam kink).
 */
export function plateStrohSpectrum(p: PlateStrohProblem, k: number, ys: ArrayLike<number>, out: Float64Array, pole = true): void {
  const { t, d, pRe, pIm, aRe, aIm, tauRe, tauIm, cRe, cIm, m, n } = p;
  const M = new Float64Array(72), r = new Float64Array(12);
  // loads: y = 0 rows 0..2: -sum conj(c_ab) e^{-ik(conj(p_a) t - p_b (t - d))}; y = t rows 3..5: sum c_ab e^{ik(p_a t - conj(p_b) d)}
  for (let a = 0; a < 3; a++)
    for (let b = 0; b < 3; b++) {
      const ph0 = -k * (pRe[a] * t - pRe[b] * (t - d)), am0 = Math.exp(-k * (pIm[a] * t + pIm[b] * (t - d)));
      const ph1 = k * (pRe[a] * t - pRe[b] * d), am1 = Math.exp(-k * (pIm[a] * t + pIm[b] * d));
      const e0r = am0 * Math.cos(ph0), e0i = am0 * Math.sin(ph0), e1r = am1 * Math.cos(ph1), e1i = am1 * Math.sin(ph1);
      for (let i = 0; i < 3; i++) {
        const q = 3 * (3 * a + b) + i;
        const xr = cRe[q], xi = -cIm[q];
        r[2 * i] -= xr * e0r - xi * e0i;
        r[2 * i + 1] -= xr * e0i + xi * e0r;
        r[2 * (3 + i)] += cRe[q] * e1r - cIm[q] * e1i;
        r[2 * (3 + i) + 1] += cRe[q] * e1i + cIm[q] * e1r;
      }
    }
  for (let a = 0; a < 3; a++) {
    const am = Math.exp(-k * pIm[a] * t), ph = k * pRe[a] * t;
    const Er = am * Math.cos(ph), Ei = am * Math.sin(ph); // e^{ik p t}; e^{-ik conj(p) t} is its conjugate
    for (let i = 0; i < 3; i++) {
      const tr = tauRe[i * 3 + a], ti = tauIm[i * 3 + a];
      let q = 2 * (i * 6 + a);
      M[q] = tr; M[q + 1] = ti;
      q = 2 * (i * 6 + 3 + a); // conj(tau) conj(E)
      M[q] = tr * Er - ti * Ei; M[q + 1] = -(tr * Ei + ti * Er);
      q = 2 * ((3 + i) * 6 + a); // tau E
      M[q] = tr * Er - ti * Ei; M[q + 1] = tr * Ei + ti * Er;
      q = 2 * ((3 + i) * 6 + 3 + a);
      M[q] = tr; M[q + 1] = -ti;
    }
  }
  csolve(6, M, r);
  const poleI = pole ? (-p.kink * Math.exp(-k * t)) / k : 0; // P = i poleI
  for (let j = 0; j < ys.length; j++) {
    const y = ys[j];
    const o = 24 * j;
    for (let c = 0; c < 24; c++) out[o + c] = 0;
    for (let a = 0; a < 3; a++) {
      // alpha_a e^{ik p y}, beta_a e^{ik conj(p)(y - t)}
      const ea = Math.exp(-k * pIm[a] * y), pa = k * pRe[a] * y;
      const eb = Math.exp(k * pIm[a] * (y - t)), pb = k * pRe[a] * (y - t);
      const er = ea * Math.cos(pa), ei = ea * Math.sin(pa), fr = eb * Math.cos(pb), fi = eb * Math.sin(pb);
      const ar = r[2 * a] * er - r[2 * a + 1] * ei, ai = r[2 * a] * ei + r[2 * a + 1] * er;
      const br = r[2 * (3 + a)] * fr - r[2 * (3 + a) + 1] * fi, bi = r[2 * (3 + a)] * fi + r[2 * (3 + a) + 1] * fr;
      const pr = pRe[a], pi = pIm[a];
      // p alpha e, conj(p) beta e', p^2 alpha e, conj(p)^2 beta e'
      const par = pr * ar - pi * ai, pai = pr * ai + pi * ar;
      const pbr = pr * br + pi * bi, pbi = pr * bi - pi * br;
      const ppar = pr * par - pi * pai, ppai = pr * pai + pi * par;
      const ppbr = pr * pbr + pi * pbi, ppbi = pr * pbi - pi * pbr;
      for (let i = 0; i < 3; i++) {
        const Ar = aRe[i * 3 + a], Ai = aIm[i * 3 + a];
        // G_x = A alpha e + conj(A) beta e'
        out[o + 2 * i] += Ar * ar - Ai * ai + Ar * br + Ai * bi;
        out[o + 2 * i + 1] += Ar * ai + Ai * ar + Ar * bi - Ai * br;
        // G_y = A p alpha e + conj(A) conj(p) beta e'
        out[o + 6 + 2 * i] += Ar * par - Ai * pai + Ar * pbr + Ai * pbi;
        out[o + 6 + 2 * i + 1] += Ar * pai + Ai * par + Ar * pbi - Ai * pbr;
        // d G_y / dy = ik (A p^2 alpha e + conj(A) conj(p)^2 beta e') (the ik applied below)
        out[o + 18 + 2 * i] += Ar * ppar - Ai * ppai + Ar * ppbr + Ai * ppbi;
        out[o + 18 + 2 * i + 1] += Ar * ppai + Ai * ppar + Ar * ppbi - Ai * ppbr;
      }
    }
    for (let i = 0; i < 3; i++) {
      // d G_x / dy = ik G_y; d G_y / dy = ik (sum above)
      const gyR = out[o + 6 + 2 * i], gyI = out[o + 6 + 2 * i + 1];
      out[o + 12 + 2 * i] = -k * gyI;
      out[o + 12 + 2 * i + 1] = k * gyR;
      const sR = out[o + 18 + 2 * i], sI = out[o + 18 + 2 * i + 1];
      out[o + 18 + 2 * i] = -k * sI;
      out[o + 18 + 2 * i + 1] = k * sR;
      // the pole: G_x -= n_i P, G_y += m_i P (P = i poleI)
      out[o + 2 * i + 1] -= n[i] * poleI;
      out[o + 6 + 2 * i + 1] += m[i] * poleI;
    }
  }
}


/** k nodes and weights (weights include the 1/pi of the one-sided inverse transform). */
function kNodes(p: PlateStrohProblem): { k: Float64Array; w: Float64Array } {
  const G = PLATE_STROH_GRID;
  const gl = gaussLegendre(G.order);
  const panels = Math.ceil(G.kMax / Math.min(1, p.minImP) / G.panel);
  const k = new Float64Array(panels * G.order), w = new Float64Array(panels * G.order);
  const dk = G.panel / p.t;
  for (let q = 0; q < panels; q++)
    for (let i = 0; i < G.order; i++) {
      k[q * G.order + i] = dk * (q + 0.5 * (gl.x[i] + 1));
      w[q * G.order + i] = (0.5 * dk * gl.w[i]) / Math.PI;
    }
  return { k, w };
}

/** The rotation added back in real space: omega_S(x) = (kink/pi) atan(x/t) and its x-derivative. */
function poleRotation(p: PlateStrohProblem, x: number): [number, number] {
  return [(p.kink / Math.PI) * Math.atan(x / p.t), ((p.kink / Math.PI) * p.t) / (p.t * p.t + x * x)];
}

/** The residual's six gradient components at (x, y) by the direct k integral (no table; tests). */
export function plateStrohResidualDirect(p: PlateStrohProblem, x: number, y: number, out: Float64Array): void {
  const { k, w } = kNodes(p);
  const spec = new Float64Array(24);
  const ys = [y];
  for (let c = 0; c < 6; c++) out[c] = 0;
  for (let q = 0; q < k.length; q++) {
    plateStrohSpectrum(p, k[q], ys, spec);
    const cr = Math.cos(k[q] * x), ci = Math.sin(k[q] * x);
    for (let c = 0; c < 6; c++) out[c] += w[q] * (spec[2 * c] * cr - spec[2 * c + 1] * ci);
  }
  const [om] = poleRotation(p, x);
  for (let i = 0; i < 3; i++) {
    out[i] += p.n[i] * om;
    out[3 + i] -= p.m[i] * om;
  }
}

/** The tabulated residual: 6 components x (f, f_x, f_y, f_xy) per node. */
export interface PlateStrohTable extends HermiteGrid {
  /** node (i, j) at 24 (j nx + i): component c at 4 c + (0 f, 1 f_x, 2 f_y, 3 f_xy). */
  readonly data: Float64Array;
}

export function plateStrohTable(p: PlateStrohProblem): PlateStrohTable {
  const G = PLATE_STROH_GRID;
  const t = p.t;
  const half = Math.ceil(G.xRange / Math.sqrt(Math.min(1, p.minImP)));
  const X = half * t;
  const nx = 2 * half * G.perThickness + 1;
  const ny = G.perThickness + 1;
  const hx = (2 * X) / (nx - 1), hy = t / (ny - 1);
  const ys = new Float64Array(ny);
  for (let j = 0; j < ny; j++) ys[j] = j * hy;
  const { k, w } = kNodes(p);
  const data = new Float64Array(24 * nx * ny);
  const spec = new Float64Array(24 * ny);
  for (let q = 0; q < k.length; q++) {
    const km = k[q], wm = w[q];
    plateStrohSpectrum(p, km, ys, spec);
    const sR = Math.cos(km * hx), sI = Math.sin(km * hx);
    for (let j = 0; j < ny; j++) {
      const F = spec.subarray(24 * j, 24 * j + 24);
      let eR = Math.cos(-km * X), eI = Math.sin(-km * X);
      let base = 24 * j * nx;
      for (let i = 0; i < nx; i++) {
        for (let c = 0; c < 6; c++) {
          const fR = F[2 * c], fI = F[2 * c + 1], gR = F[12 + 2 * c], gI = F[12 + 2 * c + 1];
          const re = fR * eR - fI * eI, im = fR * eI + fI * eR;
          const reY = gR * eR - gI * eI, imY = gR * eI + gI * eR;
          const o = base + 4 * c;
          data[o] += wm * re;
          data[o + 1] -= wm * km * im;
          data[o + 2] += wm * reY;
          data[o + 3] -= wm * km * imY;
        }
        const nR = eR * sR - eI * sI;
        eI = eR * sI + eI * sR;
        eR = nR;
        base += 24;
      }
    }
  }
  for (let i = 0; i < nx; i++) {
    const [om, omx] = poleRotation(p, -X + i * hx);
    for (let j = 0; j < ny; j++) {
      const o = 24 * (j * nx + i);
      for (let c = 0; c < 3; c++) {
        data[o + 4 * c] += p.n[c] * om;
        data[o + 4 * c + 1] += p.n[c] * omx;
        data[o + 4 * (3 + c)] -= p.m[c] * om;
        data[o + 4 * (3 + c) + 1] -= p.m[c] * omx;
      }
    }
  }
  return { nx, ny, x0: -X, hx, hy, data };
}


/** Interpolated residual (six components) at (x, y), |x| <= X. */
export function plateStrohInterpolate(tb: PlateStrohTable, x: number, y: number, out: Float64Array): void {
  hermiteGrid(tb, tb.data, 6, x, y, out);
}

/** Tables already built in this thread, by line (a render cut into parts rebuilds its fields for each). */
const TABLES = new Map<string, PlateStrohTable>();
const TABLES_KEPT = 16;

function cachedTable(p: PlateStrohProblem, key: string): PlateStrohTable {
  let tb = TABLES.get(key);
  if (tb === undefined) {
    tb = plateStrohTable(p);
    if (TABLES.size >= TABLES_KEPT) TABLES.delete(TABLES.keys().next().value as string);
  } else TABLES.delete(key);
  TABLES.set(key, tb);
  return tb;
}

/** The whole correction field (all of b) of a line parallel to the surfaces in an anisotropic plate. */
export function plateStrohCorrection(o: PlateStrohOptions): DisplacementField {
  const p = plateStrohProblem(o);
  const key = `${o.b_nm.join()},${unit(o.line).join()},${unit(o.normal).join()},${p.d},${p.t},${o.stiffness_GPa.join()}`;
  const tb = cachedTable(p, key);
  const images = strohHalfSpaceImages({ b_nm: o.b_nm, line: o.line, point_nm: o.point_nm, normal: o.normal, thickness_nm: o.thickness_nm, stiffness_GPa: o.stiffness_GPa });
  // the infinite line (far field: the correction is minus it plus the rigid turn); core radius irrelevant there
  const line = anisotropicDislocation({ b_nm: o.b_nm, line: o.line, point_nm: o.point_nm, stiffness_GPa: o.stiffness_GPa, coreRadius_nm: 1e-6 });
  const { m, n } = p;
  const xi0 = dot(o.point_nm, m);
  const X = -tb.x0;
  const H = new Float64Array(6), Gi = new Float64Array(9);
  const gradient = (out: Float64Array, px: number, py: number, pz: number): void => {
    const x = px * m[0] + py * m[1] + pz * m[2] - xi0;
    const y = px * n[0] + py * n[1] + pz * n[2];
    if (Math.abs(x) <= X) {
      hermiteGrid(tb, tb.data, 6, x, y, H);
      images.gradient(Gi, px, py, pz);
      for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out[3 * i + j] = Gi[3 * i + j] + H[i] * m[j] + H[3 + i] * n[j];
      return;
    }
    line.gradient(Gi, px, py, pz);
    const om = x > 0 ? 0.5 * p.kink : -0.5 * p.kink;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) out[3 * i + j] = -Gi[3 * i + j] + om * (n[i] * m[j] - m[i] * n[j]);
  };
  const gl = gaussLegendre(8);
  const G = new Float64Array(9);
  const P = o.point_nm;
  return withDirectional({
    displacement(out, px, py, pz) {
      // the path integral of the gradient from the line (zero there) along the straight segment
      const dx = px - P[0], dy = py - P[1], dz = pz - P[2];
      const len = Math.hypot(dx, dy, dz);
      const panels = Math.max(1, Math.ceil(len / (p.t / 8)));
      out[0] = 0; out[1] = 0; out[2] = 0;
      for (let q = 0; q < panels; q++)
        for (let i = 0; i < gl.x.length; i++) {
          const s = (q + 0.5 * (gl.x[i] + 1)) / panels, wq = (0.5 * gl.w[i]) / panels;
          gradient(G, P[0] + s * dx, P[1] + s * dy, P[2] + s * dz);
          for (let a = 0; a < 3; a++) out[a] += wq * (G[3 * a] * dx + G[3 * a + 1] * dy + G[3 * a + 2] * dz);
        }
    },
    gradient,
    directionalAt(g, k): DirectionalProbe {
      const km = dot(k as unknown as Vec3, m), kn = dot(k as unknown as Vec3, n);
      const w = [g[0] * km, g[1] * km, g[2] * km, g[0] * kn, g[1] * kn, g[2] * kn];
      const nn = tb.nx * tb.ny;
      const scalar = new Float64Array(4 * nn);
      const dt = tb.data;
      for (let q = 0; q < nn; q++)
        for (let e = 0; e < 4; e++) {
          let s = 0;
          for (let c = 0; c < 6; c++) s += w[c] * dt[24 * q + 4 * c + e];
          scalar[4 * q + e] = s;
        }
      const img = images.directionalAt!(g, k);
      const lineProbe = directionalProbe(line, g, k);
      const rot = dot(g as unknown as Vec3, n) * km - dot(g as unknown as Vec3, m) * kn;
      const m0 = m[0], m1 = m[1], m2 = m[2], n0 = n[0], n1 = n[1], n2 = n[2];
      const { nx, ny, x0, hx, hy } = tb;
      return (q) => {
        const x = q[0] * m0 + q[1] * m1 + q[2] * m2 - xi0;
        if (Math.abs(x) <= X) {
          const y = q[0] * n0 + q[1] * n1 + q[2] * n2;
          // bicubic Hermite of the one contracted component (hermiteGrid() written out for the hot path)
          const fx = (x - x0) / hx, fy = y / hy;
          let i = Math.floor(fx), j = Math.floor(fy);
          if (i < 0) i = 0;
          if (i > nx - 2) i = nx - 2;
          if (j < 0) j = 0;
          if (j > ny - 2) j = ny - 2;
          const s = fx - i, r = fy - j;
          const s2 = s * s, s3 = s2 * s, r2 = r * r, r3 = r2 * r;
          const H0s = 2 * s3 - 3 * s2 + 1, H1s = 1 - H0s, D0s = (s3 - 2 * s2 + s) * hx, D1s = (s3 - s2) * hx;
          const H0r = 2 * r3 - 3 * r2 + 1, H1r = 1 - H0r, D0r = (r3 - 2 * r2 + r) * hy, D1r = (r3 - r2) * hy;
          const q00 = 4 * (j * nx + i), q10 = q00 + 4, q01 = q00 + 4 * nx, q11 = q01 + 4;
          const c = scalar;
          const v =
            H0r * (H0s * c[q00] + H1s * c[q10] + D0s * c[q00 + 1] + D1s * c[q10 + 1]) +
            H1r * (H0s * c[q01] + H1s * c[q11] + D0s * c[q01 + 1] + D1s * c[q11 + 1]) +
            D0r * (H0s * c[q00 + 2] + H1s * c[q10 + 2] + D0s * c[q00 + 3] + D1s * c[q10 + 3]) +
            D1r * (H0s * c[q01 + 2] + H1s * c[q11 + 2] + D0s * c[q01 + 3] + D1s * c[q11 + 3]);
          img(q);
          q[3] += v;
          return;
        }
        lineProbe(q);
        q[3] = -q[3] + (x > 0 ? 0.5 : -0.5) * p.kink * rot;
      };
    },
    gradientAt(out, q) {
      gradient(out, q[0], q[1], q[2]);
    },
  });
}


