/**
 * Free-surface correction of a straight dislocation that meets a surface at an
 * angle (inclined line), each foil surface treated as an isotropic half-space.
 *
 * Method (the half-space solution by a 2D Fourier transform of the surface
 * tractions; the isotropic layer solution of e.g. Hirth & Lothe 1982 ch. 3 /
 * Timoshenko & Goodier for e^{i k x} loads, derived here). Local frame at the
 * emergence point O: e1, e2 in the surface, z along the inward normal. The
 * infinite-medium field loads the surface with T = sigma . z, homogeneous of
 * degree -1 about O: T(r, phi) = h(phi)/r. Its transform is
 * T^(k) = tau(theta)/kappa, tau = 2 pi sum_n (-i)^|n| h_n e^{i n theta}
 * (int_0^inf J_n = 1). For each k the decaying solution that puts -T^ on the
 * surface is, with a unit vector e_k along k, e_p = z x e_k:
 *   u_k = i (a + b kappa z) e^{-kappa z}, u_z = (c - b kappa z) e^{-kappa z}, u_p = S e^{-kappa z},
 *   b = (-T_z + i T_k)/(2 mu kappa), a = -i T_k/(2 mu kappa) - (1 - 2 nu) b,
 *   c = -a - (3 - 4 nu) b, S = T_p/(mu kappa).
 * The gradient then has the form (1/kappa)(P0 + P1 kappa z) e^{-kappa z}; the
 * kappa integral is elementary and the theta integral follows from
 *   int e^{i m psi} dpsi/(z - i rho cos psi) = (2 pi/R) q^|m|,  q = i (R - z)/rho,  R = |r - O|,
 * so that grad u = (1/(2 pi R)) Re sum_m e^{i m phi} (i s)^|m| [p0_m + p1_m (c^2 + |m| c)],
 * c = cos(polar angle), s = tan(polar angle / 2), p0_m, p1_m the Fourier
 * coefficients of P0(theta), P1(theta). The correction gradient is F(direction)/R:
 * F is tabulated per line on a grid of directions (s = tan(polar angle/2) x azimuth) and
 * interpolated (bicubic) on the hot path.
 *
 * Approximations (stated in README and render.json): each surface is a
 * half-space of its own (the correction for one surface leaves a traction on
 * the other); the response is isotropic (mu, nu); with anisotropic elasticity
 * the tractions come from the anisotropic field and its own Cij, the response
 * stays isotropic (Voigt-average shear modulus of the Cij, the material's nu).
 */
import { type Vec3, cross, dot, norm, scale, unit } from '../math/vec3.js';
import { type DirectionalProbe, type DisplacementField, withDirectional } from './field.js';
import { straightDislocation } from './straightDislocation.js';
import { anisotropicDislocation } from './anisotropicDislocation.js';
import { isotropicVoigt, stiffnessTensor } from './stiffness.js';
import { fftPlusInPlace } from '../math/fft1d.js';
import { gaussLegendre } from '../math/gaussLegendre.js';

/** 8-point Gauss-Legendre rule of the displacement's path integral (tests and tools only). */
const GL8 = gaussLegendre(8);

export interface InclinedHalfSpaceOptions {
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  /** Unit foil normal; the foil is 0 <= r.n <= thickness_nm. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
  readonly poissonRatio: number;
  /** Present for anisotropic elasticity: the tractions come from the Stroh field with these Cij. */
  readonly stiffness_GPa?: readonly number[];
  /** Tests only: one surface ('entrance': r.n = 0, 'exit': r.n = t). */
  readonly only?: 'entrance' | 'exit';
}

const N_HARM_SAMPLES = 256; // samples of h(phi) and theta (a line within ~15 degrees of the surface plane is resolved less well: see the tests)
const N_POLAR = 65; // nodes in s = tan(polar angle / 2) on [0, 1] (polar angle 0 to pi/2)
const N_AZ = 256; // azimuth nodes on [0, 2 pi)
// the scalar g.F.k of the hot path is made from the harmonic sums on a finer grid (lines far from the normal
// need high harmonics near the surface plane; the 9-component grid above serves `gradient`)
const S_POLAR = 129;
const S_AZ = 512;

/**
 * The table of one surface. It does not depend on where the line meets the surface (the correction is
 * F(direction)/R about the emergence point O): a line shifted in the foil, or another foil thickness,
 * reuses it; only the line direction, b, the foil normal, the elastic constants and the side count.
 */
interface SurfaceTable {
  readonly e1: Vec3;
  readonly e2: Vec3;
  readonly ez: Vec3;
  /**
   * F in the crystal Cartesian frame, 9 components (i row: displacement, j column: derivative), on the
   * padded grid (see `padded`): [node * 9 + 3 i + j]. Made from the harmonics when `gradient` first needs
   * it (`gridOf`): the renderer's two-beam path reads only the contracted scalar grids.
   */
  F: Float64Array | null;
  /** Contractions g.F.k already made (padded scalar grids), by "g,k". */
  readonly contracted: Map<string, Float64Array>;
  /** The harmonics m kept and their coefficients p0_m, p1_m (9 complex each), for the direct (untabulated) sum. */
  readonly ms: readonly number[];
  readonly c0r: readonly number[];
  readonly c0i: readonly number[];
  readonly c1r: readonly number[];
  readonly c1i: readonly number[];
}

function sigmaOf(C: Float64Array, g: Float64Array, out: Float64Array): void {
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k < 3; k++) for (let l = 0; l < 3; l++) s += C[((i * 3 + j) * 3 + k) * 3 + l] * g[3 * k + l];
      out[3 * i + j] = s;
    }
}

/** Voigt average shear modulus of a Voigt stiffness matrix (GPa). */
function voigtShear(v: readonly number[]): number {
  const d = v[0] + v[7] + v[14];
  const o = v[1] + v[2] + v[8];
  const s = v[21] + v[28] + v[35];
  return (d - o + 3 * s) / 15;
}

function buildTable(o: InclinedHalfSpaceOptions, which: 'entrance' | 'exit'): SurfaceTable {
  const N_HARM = N_HARM_SAMPLES;
  const u = unit(o.line);
  const n = unit(o.normal);
  const nu = o.poissonRatio;
  // the line through the origin (the table is the same for every emergence point)
  const O: Vec3 = [0, 0, 0];
  const ez = which === 'entrance' ? n : scale(n, -1);
  const trial: Vec3 = Math.abs(ez[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
  const e1 = unit(cross(trial, ez));
  const e2 = cross(ez, e1);
  // the infinite field (singular core: tiny radius) and Hooke's law
  const rc = 1e-7; // nm: the singular field (the traction is sampled 1 nm from the emergence point)
  let field: DisplacementField;
  let C: Float64Array;
  let mu: number;
  if (o.stiffness_GPa === undefined) {
    field = straightDislocation({ b_nm: o.b_nm, line: u, point_nm: O, poissonRatio: nu, coreRadius_nm: rc });
    mu = 1;
    C = stiffnessTensor(isotropicVoigt(1, nu));
  } else {
    field = anisotropicDislocation({ b_nm: o.b_nm, line: u, point_nm: O, stiffness_GPa: o.stiffness_GPa, coreRadius_nm: rc });
    mu = voigtShear(o.stiffness_GPa);
    C = stiffnessTensor(o.stiffness_GPa);
  }
  // h(phi) = r T(r, phi), local components, at r = r0
  const r0 = 1;
  const hr: Float64Array[] = [new Float64Array(N_HARM), new Float64Array(N_HARM), new Float64Array(N_HARM)];
  const g = new Float64Array(9);
  const sg = new Float64Array(9);
  for (let j = 0; j < N_HARM; j++) {
    const ph = (2 * Math.PI * j) / N_HARM;
    const cx = Math.cos(ph) * r0, cy = Math.sin(ph) * r0;
    const x = O[0] + cx * e1[0] + cy * e2[0], y = O[1] + cx * e1[1] + cy * e2[1], z = O[2] + cx * e1[2] + cy * e2[2];
    field.gradient(g, x, y, z);
    sigmaOf(C, g, sg);
    const T = [0, 1, 2].map((i) => sg[3 * i] * ez[0] + sg[3 * i + 1] * ez[1] + sg[3 * i + 2] * ez[2]);
    hr[0][j] = r0 * (T[0] * e1[0] + T[1] * e1[1] + T[2] * e1[2]);
    hr[1][j] = r0 * (T[0] * e2[0] + T[1] * e2[1] + T[2] * e2[2]);
    hr[2][j] = r0 * (T[0] * ez[0] + T[1] * ez[1] + T[2] * ez[2]);
  }
  // Fourier coefficients h_n = (1/N) sum_j h_j e^{-2 pi i n j / N}, n = -N/2 + 1 .. N/2 - 1 (the Nyquist term is
  // ambiguous: dropped; h is smooth, it is negligible), then tau(theta_j) = 2 pi sum_n (-i)^|n| h_n e^{i n theta_j};
  // both by FFT (h real: its forward transform is the conjugate of the + sign one)
  const H = N_HARM / 2;
  const tauR = [0, 1, 2].map(() => new Float64Array(N_HARM));
  const tauI = [0, 1, 2].map(() => new Float64Array(N_HARM));
  for (let c = 0; c < 3; c++) {
    const re = tauR[c], im = tauI[c];
    re.set(hr[c]);
    fftPlusInPlace(re, im);
    // slot k holds sum_j h_j e^{+2 pi i k j / N}: h_n = conj(slot n mod N) / N; then the phase (-i)^|n| and 2 pi
    for (let k = 0; k < N_HARM; k++) {
      const nn = k < H ? k : k - N_HARM;
      if (nn === -H) {
        re[k] = 0;
        im[k] = 0;
        continue;
      }
      const xr = re[k] / N_HARM, xi = -im[k] / N_HARM;
      const an = Math.abs(nn) % 4; // (-i)^|n|: 1, -i, -1, i
      const pr = an === 0 ? 1 : an === 2 ? -1 : 0;
      const pi = an === 1 ? -1 : an === 3 ? 1 : 0;
      re[k] = 2 * Math.PI * (pr * xr - pi * xi);
      im[k] = 2 * Math.PI * (pr * xi + pi * xr);
    }
    fftPlusInPlace(re, im);
  }
  // P0(theta), P1(theta) at theta_j (9 complex each, local frame)
  const P0r = new Float64Array(N_HARM * 9), P0i = new Float64Array(N_HARM * 9);
  const P1r = new Float64Array(N_HARM * 9), P1i = new Float64Array(N_HARM * 9);
  for (let j = 0; j < N_HARM; j++) {
    const th = (2 * Math.PI * j) / N_HARM;
    const tr = [tauR[0][j], tauR[1][j], tauR[2][j]], ti = [tauI[0][j], tauI[1][j], tauI[2][j]];
    const ct = Math.cos(th), st = Math.sin(th);
    const tkR = tr[0] * ct + tr[1] * st, tkI = ti[0] * ct + ti[1] * st;
    const tpR = -tr[0] * st + tr[1] * ct, tpI = -ti[0] * st + ti[1] * ct;
    const tzR = tr[2], tzI = ti[2];
    // beta = (-tau_z + i tau_k)/(2 mu); alpha = -i tau_k/(2 mu) - (1 - 2nu) beta; gamma = -alpha - (3 - 4nu) beta; sigma = tau_p/mu
    const bR = (-tzR - tkI) / (2 * mu), bI = (-tzI + tkR) / (2 * mu);
    const aR = tkI / (2 * mu) - (1 - 2 * nu) * bR, aI = -tkR / (2 * mu) - (1 - 2 * nu) * bI;
    const gR = -aR - (3 - 4 * nu) * bR, gI = -aI - (3 - 4 * nu) * bI;
    const sR = tpR / mu, sI = tpI / mu;
    // V0 = i alpha e_k + sigma e_p + gamma z; V1 = i beta e_k - beta z (local components)
    const V0r = [-aI * ct - sR * st, -aI * st + sR * ct, gR];
    const V0i = [aR * ct - sI * st, aR * st + sI * ct, gI];
    const V1r = [-bI * ct, -bI * st, -bR];
    const V1i = [bR * ct, bR * st, -bI];
    const ek = [ct, st];
    for (let i = 0; i < 3; i++) {
      for (let jj = 0; jj < 2; jj++) {
        // P0 = i e_kj V0_i, P1 = i e_kj V1_i
        P0r[j * 9 + 3 * i + jj] = -ek[jj] * V0i[i];
        P0i[j * 9 + 3 * i + jj] = ek[jj] * V0r[i];
        P1r[j * 9 + 3 * i + jj] = -ek[jj] * V1i[i];
        P1i[j * 9 + 3 * i + jj] = ek[jj] * V1r[i];
      }
      P0r[j * 9 + 3 * i + 2] = V1r[i] - V0r[i];
      P0i[j * 9 + 3 * i + 2] = V1i[i] - V0i[i];
      P1r[j * 9 + 3 * i + 2] = -V1r[i];
      P1i[j * 9 + 3 * i + 2] = -V1i[i];
    }
  }
  // Fourier coefficients p0_m, p1_m (m = -H .. H - 1), only those above a threshold are kept
  const ms: number[] = [];
  const c0r: number[] = [], c0i: number[] = [], c1r: number[] = [], c1i: number[] = [];
  let pmax = 0;
  const all: { m: number; a: Float64Array }[] = [];
  // forward DFT (sign -) of the 18 complex series by the + sign FFT of the conjugates
  const spec = new Float64Array(36 * N_HARM); // [component (0..35 as in a[]) * N_HARM + slot]
  {
    const fr = new Float64Array(N_HARM), fi = new Float64Array(N_HARM);
    for (let k = 0; k < 9; k++) {
      for (const [Pr, Pi, off] of [[P0r, P0i, 0], [P1r, P1i, 18]] as [Float64Array, Float64Array, number][]) {
        for (let j = 0; j < N_HARM; j++) {
          fr[j] = Pr[j * 9 + k];
          fi[j] = -Pi[j * 9 + k];
        }
        fftPlusInPlace(fr, fi);
        for (let sl = 0; sl < N_HARM; sl++) {
          spec[(off + k) * N_HARM + sl] = fr[sl] / N_HARM;
          spec[(off + 9 + k) * N_HARM + sl] = -fi[sl] / N_HARM;
        }
      }
    }
  }
  for (let q = 1; q < N_HARM; q++) {
    const m = q - H;
    const slot = ((m % N_HARM) + N_HARM) % N_HARM;
    const a = new Float64Array(36);
    for (let k = 0; k < 36; k++) a[k] = spec[k * N_HARM + slot];
    let mx = 0;
    for (let k = 0; k < 36; k++) mx = Math.max(mx, Math.abs(a[k]));
    pmax = Math.max(pmax, mx);
    all.push({ m, a });
  }
  const kept = all.filter((x) => Math.max(...x.a.map(Math.abs)) > 1e-12 * pmax);
  for (const { m, a } of kept) {
    ms.push(m);
    for (let k = 0; k < 9; k++) {
      c0r.push(a[k]);
      c0i.push(a[9 + k]);
      c1r.push(a[18 + k]);
      c1i.push(a[27 + k]);
    }
  }
  return { e1, e2, ez, F: null, contracted: new Map(), ms, c0r, c0i, c1r, c1i };
}

/** The 9-component padded grid of a table (made once, on first use). */
function gridOf(tb: SurfaceTable): Float64Array {
  if (tb.F !== null) return tb.F;
  const { ms, c0r, c0i, c1r, c1i } = tb;
  // table F(polar, azimuth): F = (1/2pi) Re sum_m e^{i m phi} (i s)^|m| [p0_m + p1_m (c^2 + |m| c)]
  const F = new Float64Array(N_POLAR * N_AZ * 9);
  const re = new Float64Array(N_AZ), im = new Float64Array(N_AZ);
  const coef = new Float64Array(ms.length * 18); // per harmonic: complex 9-vector at this polar angle, times (i s)^|m| / 2pi
  for (let ip = 0; ip < N_POLAR; ip++) {
    // nodes uniform in s = tan(polar/2) = rho/(R + z) (no trigonometry on the hot path), c = cos(polar)
    const s = ip / (N_POLAR - 1);
    const c = (1 - s * s) / (1 + s * s);
    for (let q = 0; q < ms.length; q++) {
      const am = Math.abs(ms[q]);
      const mag = (am === 0 ? 1 : Math.pow(s, am)) / (2 * Math.PI);
      // i^|m|
      const r4 = am % 4;
      const ir = r4 === 0 ? mag : r4 === 2 ? -mag : 0;
      const ii = r4 === 1 ? mag : r4 === 3 ? -mag : 0;
      const w = c * c + am * c;
      for (let k = 0; k < 9; k++) {
        const xr = c0r[q * 9 + k] + c1r[q * 9 + k] * w;
        const xi = c0i[q * 9 + k] + c1i[q * 9 + k] * w;
        coef[q * 18 + k] = ir * xr - ii * xi;
        coef[q * 18 + 9 + k] = ir * xi + ii * xr;
      }
    }
    // F(phi_ia) = Re sum_m coef_m e^{i m phi_ia}: an inverse DFT of N_AZ points per component (FFT)
    for (let k = 0; k < 9; k++) {
      re.fill(0);
      im.fill(0);
      for (let q = 0; q < ms.length; q++) {
        const slot = ((ms[q] % N_AZ) + N_AZ) % N_AZ;
        re[slot] += coef[q * 18 + k];
        im[slot] += coef[q * 18 + 9 + k];
      }
      fftPlusInPlace(re, im);
      for (let ia = 0; ia < N_AZ; ia++) F[(ip * N_AZ + ia) * 9 + k] = re[ia];
    }
  }
  tb.F = padded(cartesian(F, [tb.e1, tb.e2, tb.ez]), 9);
  return tb.F;
}

/**
 * Tests only: the correction gradient (Cartesian, out[3 i + j]) of one surface by the direct
 * harmonic sum, without the table (the tabulated field is this sum interpolated).
 */
export function halfSpaceGradientDirect(o: InclinedHalfSpaceOptions, which: 'entrance' | 'exit', out: Float64Array, x: number, y: number, z: number): void {
  const tb = tableFor(o, which);
  const O = emergencePoint(o, which);
  const rx = x - O[0], ry = y - O[1], rz = z - O[2];
  const X = rx * tb.e1[0] + ry * tb.e1[1] + rz * tb.e1[2];
  const Y = rx * tb.e2[0] + ry * tb.e2[1] + rz * tb.e2[2];
  const Z = rx * tb.ez[0] + ry * tb.ez[1] + rz * tb.ez[2];
  const rho = Math.hypot(X, Y);
  const R = Math.hypot(rho, Z);
  const vt = Math.atan2(rho, Z);
  const ph = Math.atan2(Y, X);
  const c = Math.cos(vt);
  const sv = Math.tan(vt / 2);
  const local = new Float64Array(9);
  for (let q = 0; q < tb.ms.length; q++) {
    const m = tb.ms[q];
    const am = Math.abs(m);
    const mag = am === 0 ? 1 : Math.pow(sv, am);
    const ang = m * ph + (am * Math.PI) / 2;
    const er = mag * Math.cos(ang), ei = mag * Math.sin(ang);
    const w = c * c + am * c;
    for (let k = 0; k < 9; k++) {
      const xr = tb.c0r[q * 9 + k] + tb.c1r[q * 9 + k] * w;
      const xi = tb.c0i[q * 9 + k] + tb.c1i[q * 9 + k] * w;
      local[k] += (er * xr - ei * xi) / (2 * Math.PI * R);
    }
  }
  const E = [tb.e1, tb.e2, tb.ez];
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) s += E[a][i] * local[3 * a + b] * E[b][j];
      out[3 * i + j] = s;
    }
}

/** Row length of the padded 9-component grids: azimuth nodes -1 .. N_AZ + 1 (rows: polar nodes -1 .. N_POLAR). */
const PAD_W = N_AZ + 3;

/**
 * A grid (N_POLAR x N_AZ nodes, `comps` numbers per node) padded with the nodes the bicubic stencil
 * reaches beyond its edges, so that the hot path reads 4 x 4 neighbours without wrapping: azimuth -1 and
 * N_AZ, N_AZ + 1 wrap round; polar -1 (through the normal: polar -v at azimuth phi is polar v at phi + pi)
 * and polar N_POLAR (beyond the surface plane, mirrored: points there lie outside the foil).
 */
function padded(T: Float64Array, comps: number, nP = N_POLAR, nA = N_AZ): Float64Array {
  const padW = nA + 3;
  const out = new Float64Array((nP + 2) * padW * comps);
  for (let r = 0; r < nP + 2; r++) {
    const ip = r - 1;
    const src = ip < 0 ? -ip : ip > nP - 1 ? 2 * (nP - 1) - ip : ip;
    const shift = ip < 0 ? nA / 2 : 0;
    for (let c = 0; c < padW; c++) {
      const ia = (((c - 1 + shift) % nA) + nA) % nA;
      const from = (src * nA + ia) * comps;
      const to = (r * padW + c) * comps;
      for (let k = 0; k < comps; k++) out[to + k] = T[from + k];
    }
  }
  return out;
}

/** The 9-component local grid (frame E = [e1, e2, ez]) turned into the Cartesian frame, node by node: E local E^T. */
function cartesian(F: Float64Array, E: readonly Vec3[]): Float64Array {
  const out = new Float64Array(F.length);
  for (let c = 0; c < F.length; c += 9)
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++) {
        let s = 0;
        for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) s += E[a][i] * F[c + 3 * a + b] * E[b][j];
        out[c + 3 * i + j] = s;
      }
  return out;
}

/**
 * The scalar g.F.k of a table on the fine padded grid (S_POLAR x S_AZ), made once per (g, k) from the
 * harmonic sums contracted (one FFT per ring) and kept with the table.
 */
function contract(tb: SurfaceTable, g: readonly number[], k: readonly number[]): Float64Array {
  const key = `${g[0]},${g[1]},${g[2]},${k[0]},${k[1]},${k[2]}`;
  const hit = tb.contracted.get(key);
  if (hit !== undefined) return hit;
  // g and k in the table's local frame; the coefficients are local (row: displacement, column: derivative)
  const E = [tb.e1, tb.e2, tb.ez];
  const gl = E.map((e) => g[0] * e[0] + g[1] * e[1] + g[2] * e[2]);
  const kl = E.map((e) => k[0] * e[0] + k[1] * e[1] + k[2] * e[2]);
  const nH = tb.ms.length;
  const a0r = new Float64Array(nH), a0i = new Float64Array(nH), a1r = new Float64Array(nH), a1i = new Float64Array(nH);
  for (let q = 0; q < nH; q++)
    for (let i = 0; i < 3; i++)
      for (let j = 0; j < 3; j++) {
        const w = gl[i] * kl[j];
        const o = q * 9 + 3 * i + j;
        a0r[q] += w * tb.c0r[o];
        a0i[q] += w * tb.c0i[o];
        a1r[q] += w * tb.c1r[o];
        a1i[q] += w * tb.c1i[o];
      }
  // S(s, phi) = Re sum_m e^{i m phi} (i s)^|m| [a0_m + a1_m (c^2 + |m| c)] / 2 pi, ring by ring
  const T = new Float64Array(S_POLAR * S_AZ);
  const re = new Float64Array(S_AZ), im = new Float64Array(S_AZ);
  const slots = new Int32Array(nH), ams = new Int32Array(nH);
  let mMax = 0;
  for (let q = 0; q < nH; q++) {
    ams[q] = Math.abs(tb.ms[q]);
    slots[q] = ((tb.ms[q] % S_AZ) + S_AZ) % S_AZ;
    mMax = Math.max(mMax, ams[q]);
  }
  const pw = new Float64Array(mMax + 1); // s^m / 2 pi
  // the coefficients of one ring into (cr, ci) by slot
  const ring = (ip: number, cr: Float64Array, ci: Float64Array): void => {
    const sv = ip / (S_POLAR - 1);
    const c = (1 - sv * sv) / (1 + sv * sv);
    pw[0] = 1 / (2 * Math.PI);
    for (let m = 1; m <= mMax; m++) pw[m] = pw[m - 1] * sv;
    cr.fill(0);
    ci.fill(0);
    for (let q = 0; q < nH; q++) {
      const am = ams[q];
      const mag = pw[am];
      const r4 = am & 3;
      const ir = r4 === 0 ? mag : r4 === 2 ? -mag : 0;
      const ii = r4 === 1 ? mag : r4 === 3 ? -mag : 0;
      const w = c * c + am * c;
      const xr = a0r[q] + a1r[q] * w, xi = a0i[q] + a1i[q] * w;
      const slot = slots[q];
      cr[slot] += ir * xr - ii * xi;
      ci[slot] += ir * xi + ii * xr;
    }
  };
  // Two rings per FFT: Re sum_m c_m e^{i m phi} = sum_m d_m e^{i m phi} with d_m = (c_m + conj(c_-m))/2 (Hermitian,
  // so the sum is real); transforming dA + i dB gives ring A in the real part and ring B in the imaginary part.
  const bRe = new Float64Array(S_AZ), bIm = new Float64Array(S_AZ);
  for (let ip = 0; ip < S_POLAR; ip += 2) {
    const pair = ip + 1 < S_POLAR;
    ring(ip, re, im);
    if (pair) ring(ip + 1, bRe, bIm);
    else {
      bRe.fill(0);
      bIm.fill(0);
    }
    // in place, slot k with its mirror S_AZ - k (k = 0 and S_AZ / 2 are their own mirrors)
    for (let k = 0; k <= S_AZ / 2; k++) {
      const kk = (S_AZ - k) % S_AZ;
      const aR = 0.5 * (re[k] + re[kk]), aI = 0.5 * (im[k] - im[kk]); // dA_k
      const aR2 = 0.5 * (re[kk] + re[k]), aI2 = 0.5 * (im[kk] - im[k]); // dA_kk
      const bR = 0.5 * (bRe[k] + bRe[kk]), bI = 0.5 * (bIm[k] - bIm[kk]);
      const bR2 = 0.5 * (bRe[kk] + bRe[k]), bI2 = 0.5 * (bIm[kk] - bIm[k]);
      re[k] = aR - bI;
      im[k] = aI + bR;
      re[kk] = aR2 - bI2;
      im[kk] = aI2 + bR2;
    }
    fftPlusInPlace(re, im);
    T.set(re, ip * S_AZ);
    if (pair) T.set(im, (ip + 1) * S_AZ);
  }
  const S = padded(T, 1, S_POLAR, S_AZ);
  remember(tb.contracted, CONTRACTED_SIZE, key, S);
  return S;
}

/** atan(j / 64), j = 0 .. 64, in units of the scalar grid's azimuth step 2 pi / S_AZ. */
const ATAN_NODES = Float64Array.from({ length: 65 }, (_, j) => (Math.atan(j / 64) * S_AZ) / (2 * Math.PI));
const NODES_PER_RADIAN = S_AZ / (2 * Math.PI);

/**
 * The azimuth atan2(Y, X) in [0, 2 pi] in units of 2 pi / S_AZ (the scalar grid's azimuth step), without
 * Math.atan2: reduced to the first octant, t = min/max in [0, 1]; atan t = atan(t_j) + atan u with t_j the
 * nearest of j/64 and u = (t - t_j)/(1 + t t_j), |u| <= 1/128, whose series stops after u^7 (the next term,
 * u^9/9 < 2e-20, is below rounding). Agrees with Math.atan2 to rounding (test/elasticity/surfaceHalfSpaceInclined.test.ts).
 */
export function azimuthNodes(X: number, Y: number): number {
  const ax = X < 0 ? -X : X;
  const ay = Y < 0 ? -Y : Y;
  const swap = ay > ax;
  const mn = swap ? ax : ay;
  const mx = swap ? ay : ax;
  if (mx === 0) return 0;
  const j = ((mn / mx) * 64 + 0.5) | 0;
  const tj = j * (1 / 64);
  const u = (mn - tj * mx) / (mx + tj * mn);
  const u2 = u * u;
  let a = ATAN_NODES[j] + NODES_PER_RADIAN * u * (1 - u2 * (1 / 3 - u2 * (1 / 5 - u2 * (1 / 7))));
  if (swap) a = S_AZ / 4 - a;
  if (X < 0) a = S_AZ / 2 - a;
  if (Y < 0) a = S_AZ - a;
  return a;
}

/**
 * Tables already built in this thread. A render builds the same line once per condition: the table
 * of each b is kept. The correction is linear in b: when a second Burgers vector comes for the same
 * line geometry (identification renders many), the tables of the three Cartesian unit vectors are
 * built once and combined for every further b.
 */
const byB = new Map<string, SurfaceTable>();
const byGeometry = new Map<string, SurfaceTable[] | 'seen'>();
// a table holds its harmonics (a few kB), once `gradient` has been used its 9-component grid (67 x 259 x 9 numbers,
// 1.2 MB): at most 16 per b and 8 geometries (x 3 unit b) per thread
const BY_B_SIZE = 16;
const BY_GEOMETRY_SIZE = 8;
// contracted scalar grids (131 x 515 numbers, 540 kB each) kept per table: the conditions of one scenario or identification
const CONTRACTED_SIZE = 8;

function remember<V>(m: Map<string, V>, size: number, key: string, v: V): void {
  if (m.size >= size) m.delete(m.keys().next().value as string);
  m.set(key, v);
}

/** Where the line meets the surface (entrance r.n = 0 or exit r.n = t). */
function emergencePoint(o: InclinedHalfSpaceOptions, which: 'entrance' | 'exit'): Vec3 {
  const u = unit(o.line);
  const n = unit(o.normal);
  const P = o.point_nm;
  const lam = ((which === 'entrance' ? 0 : o.thickness_nm) - dot(P, n)) / dot(u, n);
  return [P[0] + lam * u[0], P[1] + lam * u[1], P[2] + lam * u[2]];
}

function tableFor(o: InclinedHalfSpaceOptions, which: 'entrance' | 'exit'): SurfaceTable {
  // not the point or the thickness: the table is the same wherever the line meets the surface
  const gKey = JSON.stringify([unit(o.line), unit(o.normal), o.poissonRatio, o.stiffness_GPa ?? null, which]);
  const bKey = JSON.stringify([o.b_nm, gKey]);
  const hit = byB.get(bKey);
  if (hit !== undefined) return hit;
  const basis = byGeometry.get(gKey);
  if (basis === undefined) {
    const tb = buildTable(o, which);
    remember(byGeometry, BY_GEOMETRY_SIZE, gKey, 'seen');
    remember(byB, BY_B_SIZE, bKey, tb);
    return tb;
  }
  let bs: SurfaceTable[];
  if (basis === 'seen') {
    bs = ([[1, 0, 0], [0, 1, 0], [0, 0, 1]] as Vec3[]).map((e) => buildTable({ ...o, b_nm: e }, which));
    remember(byGeometry, BY_GEOMETRY_SIZE, gKey, bs);
  } else bs = basis;
  const b = o.b_nm;
  const t0 = bs[0];
  // the harmonic coefficients of the three combined, one entry per harmonic m
  const ms: number[] = [];
  const c0r: number[] = [], c0i: number[] = [], c1r: number[] = [], c1i: number[] = [];
  const at = new Map<number, number>();
  bs.forEach((tb, i) => {
    tb.ms.forEach((m, q) => {
      let e = at.get(m);
      if (e === undefined) {
        e = ms.length;
        at.set(m, e);
        ms.push(m);
        for (let k = 0; k < 9; k++) {
          c0r.push(0);
          c0i.push(0);
          c1r.push(0);
          c1i.push(0);
        }
      }
      for (let k = 0; k < 9; k++) {
        c0r[e * 9 + k] += b[i] * tb.c0r[q * 9 + k];
        c0i[e * 9 + k] += b[i] * tb.c0i[q * 9 + k];
        c1r[e * 9 + k] += b[i] * tb.c1r[q * 9 + k];
        c1i[e * 9 + k] += b[i] * tb.c1i[q * 9 + k];
      }
    });
  });
  const tb: SurfaceTable = { e1: t0.e1, e2: t0.e2, ez: t0.ez, F: null, contracted: new Map(), ms, c0r, c0i, c1r, c1i };
  remember(byB, BY_B_SIZE, bKey, tb);
  return tb;
}

/**
 * The correction field of an inclined line: the half-space corrections of the
 * entrance and the exit surface, added (each computed as if the other surface
 * were absent).
 */
export function inclinedHalfSpaceCorrection(o: InclinedHalfSpaceOptions): DisplacementField {
  const tables: SurfaceTable[] = [];
  if (o.only !== 'exit') tables.push(tableFor(o, 'entrance'));
  if (o.only !== 'entrance') tables.push(tableFor(o, 'exit'));
  const nT = tables.length;
  // per surface: the emergence point and the local axes, flat (x, y, z per vector)
  const geo = new Float64Array(12 * nT);
  const Os = tables.map((_, q) => emergencePoint(o, nT === 2 ? (q === 0 ? 'entrance' : 'exit') : (o.only as 'entrance' | 'exit')));
  tables.forEach((tb, q) => geo.set([...Os[q], ...tb.e1, ...tb.e2, ...tb.ez], 12 * q));
  // the last point located: 1/R, the padded grid's stencil corner (node index) and the Catmull-Rom weights
  const at = new Float64Array(9);
  const corner = new Int32Array(1);
  /** Locates (x, y, z) relative to surface q on the 9-component grid (N_POLAR x N_AZ), sets `at` and `corner`. */
  const locate = (q: number, x: number, y: number, z: number): void => {
    const b = 12 * q;
    const rx = x - geo[b], ry = y - geo[b + 1], rz = z - geo[b + 2];
    const X = rx * geo[b + 3] + ry * geo[b + 4] + rz * geo[b + 5];
    const Y = rx * geo[b + 6] + ry * geo[b + 7] + rz * geo[b + 8];
    const Z = rx * geo[b + 9] + ry * geo[b + 10] + rz * geo[b + 11];
    const rho2 = X * X + Y * Y;
    const rho = Math.sqrt(rho2);
    const R = Math.sqrt(rho2 + Z * Z);
    const sv = R > 0 ? rho / (R + (Z > 0 ? Z : 0)) : 0; // s = tan(polar / 2)
    const fp = sv * (N_POLAR - 1);
    let i = Math.floor(fp);
    if (i > N_POLAR - 2) i = N_POLAR - 2;
    const fa = azimuthNodes(X, Y) * (N_AZ / S_AZ);
    let a = Math.floor(fa);
    const f = fp - i;
    const g = fa - a;
    if (a >= N_AZ) a -= N_AZ; // the azimuth rounded up to 2 pi
    // Catmull-Rom weights of both fractions
    const f2 = f * f, f3 = f2 * f, g2 = g * g, g3 = g2 * g;
    at[0] = 1 / (R > 1e-9 ? R : 1e-9);
    at[1] = 0.5 * (-f3 + 2 * f2 - f);
    at[2] = 0.5 * (3 * f3 - 5 * f2 + 2);
    at[3] = 0.5 * (-3 * f3 + 4 * f2 + f);
    at[4] = 0.5 * (f3 - f2);
    at[5] = 0.5 * (-g3 + 2 * g2 - g);
    at[6] = 0.5 * (3 * g3 - 5 * g2 + 2);
    at[7] = 0.5 * (-3 * g3 + 4 * g2 + g);
    at[8] = 0.5 * (g3 - g2);
    corner[0] = i * PAD_W + a; // padded row i is polar node i - 1, padded column a is azimuth node a - 1
  };
  const addGradient = (out: Float64Array, x: number, y: number, z: number): void => {
    for (let q = 0; q < nT; q++) {
      locate(q, x, y, z);
      const F = gridOf(tables[q]);
      for (let p = 0; p < 4; p++) {
        const wp = at[1 + p] * at[0];
        const row = (corner[0] + p * PAD_W) * 9;
        for (let c = 0; c < 4; c++) {
          const w = wp * at[5 + c];
          const base = row + 9 * c;
          for (let k = 0; k < 9; k++) out[k] += w * F[base + k];
        }
      }
    }
  };
  /**
   * The renderer's hot path: g.F.k of each surface from its contracted scalar grid (made once per condition,
   * kept with the table), both surfaces in one loop without calls. The azimuth comes from `azimuthNodes`
   * (no Math.atan2, which V8 does not inline); s = tan(polar / 2) and 1/R share one division.
   */
  const directionalAt = (gv: readonly [number, number, number], kv: readonly [number, number, number]): DirectionalProbe => {
    const S0 = contract(tables[0], gv, kv);
    const S1 = nT > 1 ? contract(tables[1], gv, kv) : S0;
    const W = S_AZ + 3;
    const sP = S_POLAR - 1;
    const iMax = S_POLAR - 2;
    return (p) => {
      const x = p[0], y = p[1], z = p[2];
      let sum = 0;
      for (let q = 0; q < nT; q++) {
        const b = 12 * q;
        const rx = x - geo[b], ry = y - geo[b + 1], rz = z - geo[b + 2];
        const X = rx * geo[b + 3] + ry * geo[b + 4] + rz * geo[b + 5];
        const Y = rx * geo[b + 6] + ry * geo[b + 7] + rz * geo[b + 8];
        const Z = rx * geo[b + 9] + ry * geo[b + 10] + rz * geo[b + 11];
        const rho2 = X * X + Y * Y;
        const R = Math.sqrt(rho2 + Z * Z);
        let sv: number, invR: number;
        if (R > 1e-9) {
          const Rz = R + (Z > 0 ? Z : 0);
          const d = 1 / (R * Rz);
          sv = Math.sqrt(rho2) * R * d; // rho / (R + z)
          invR = Rz * d;
        } else {
          sv = R > 0 ? Math.sqrt(rho2) / (R + (Z > 0 ? Z : 0)) : 0;
          invR = 1e9;
        }
        const fa = azimuthNodes(X, Y);
        const fp = sv * sP;
        // both fractions are >= 0 (s in [0, 1], azimuth in [0, S_AZ]): truncation is the floor, in int32
        let i = fp | 0;
        if (i > iMax) i = iMax;
        let a = fa | 0;
        const f = fp - i;
        const g = fa - a;
        if (a >= S_AZ) a -= S_AZ; // the azimuth rounded up to 2 pi
        const f2 = f * f, f3 = f2 * f, g2 = g * g, g3 = g2 * g;
        const w0 = 0.5 * (-f3 + 2 * f2 - f), w1 = 0.5 * (3 * f3 - 5 * f2 + 2), w2 = 0.5 * (-3 * f3 + 4 * f2 + f), w3 = 0.5 * (f3 - f2);
        const v0 = 0.5 * (-g3 + 2 * g2 - g), v1 = 0.5 * (3 * g3 - 5 * g2 + 2), v2 = 0.5 * (-3 * g3 + 4 * g2 + g), v3 = 0.5 * (g3 - g2);
        const S = q === 0 ? S0 : S1;
        // padded row i is polar node i - 1, padded column a is azimuth node a - 1: the stencil starts there
        const r0 = i * W + a, r1 = r0 + W, r2 = r1 + W, r3 = r2 + W;
        const s =
          w0 * (v0 * S[r0] + v1 * S[r0 + 1] + v2 * S[r0 + 2] + v3 * S[r0 + 3]) +
          w1 * (v0 * S[r1] + v1 * S[r1 + 1] + v2 * S[r1 + 2] + v3 * S[r1 + 3]) +
          w2 * (v0 * S[r2] + v1 * S[r2 + 1] + v2 * S[r2 + 2] + v3 * S[r2 + 3]) +
          w3 * (v0 * S[r3] + v1 * S[r3 + 1] + v2 * S[r3 + 2] + v3 * S[r3 + 3]);
        sum += s * invR;
      }
      p[3] = sum;
    };
  };
  return withDirectional({
    displacement(out, x, y, z) {
      // not used by the renderer: the path integral of the gradient from the foil's mid-plane above the entrance point
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
      const t0 = tables[0];
      const mid = scale(t0.ez, o.thickness_nm / 2);
      const ref: Vec3 = [Os[0][0] + mid[0], Os[0][1] + mid[1], Os[0][2] + mid[2]];
      const { x: gl, w: gw } = GL8;
      const g = new Float64Array(9);
      const d: Vec3 = [x - ref[0], y - ref[1], z - ref[2]];
      const panels = 16;
      for (let p = 0; p < panels; p++)
        for (let q = 0; q < 8; q++) {
          const s = (p + (gl[q] + 1) / 2) / panels;
          g.fill(0);
          addGradient(g, ref[0] + s * d[0], ref[1] + s * d[1], ref[2] + s * d[2]);
          const wt = gw[q] / (2 * panels);
          for (let i = 0; i < 3; i++) out[i] += wt * (g[3 * i] * d[0] + g[3 * i + 1] * d[1] + g[3 * i + 2] * d[2]);
        }
    },
    gradient(out, x, y, z) {
      out.fill(0);
      addGradient(out, x, y, z);
    },
    gradientAt(out, p) {
      for (let k = 0; k < 9; k++) out[k] = 0;
      addGradient(out, p[0], p[1], p[2]);
    },
    directionalAt,
  });
}
