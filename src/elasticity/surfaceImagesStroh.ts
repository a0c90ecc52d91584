/**
 * Anisotropic surface images of a straight dislocation parallel to the foil
 * surfaces (Stroh formalism; the half-space image solution of Ting 1996,
 * Anisotropic Elasticity ch. 8, and Barnett & Lothe 1974): in the Stroh frame
 * m = n x u (along the surface, across the line), n = foil normal, the infinite
 * field is R = (1/pi) Im sum_a A_a c_a ln(z_a), z_a = xi + p_a (eta - d), with
 * stress function phi = (1/pi) Im sum_a B_a c_a ln(z_a), c = G^-1 B^T b
 * (src/elasticity/anisotropicDislocation.ts); xi = m.(r - P), eta = n.r the
 * depth, d = n.P the depth of the line. The traction on a plane eta = const is
 * d phi / d xi. Adding
 *   (1/pi) Im sum_a sum_b A_a C_ab ln(xi + p_a eta - conj(p_b) d),   C[:, b] = B^-1 conj(B_b c_b),
 * makes phi vanish on eta = 0 (each term equals the conjugate of an infinite-field
 * term there), so the surface eta = 0 is traction-free: exact for a half-space,
 * for every Burgers vector (screw and edge components). The same with d -> d - t,
 * eta -> eta - t frees the exit surface. Each image cancels the traction on its
 * own surface exactly and leaves a traction on the other surface; the renderer
 * uses them as the first step of the exact plate correction (surfacePlateStroh.ts,
 * which adds the strip's Fourier solution for those leftover tractions). Alone
 * (tests) they are the two half-space corrections without repeated reflections.
 *
 * Needs well separated Stroh eigenvalues p (the diagonal form); for degenerate
 * ones (isotropic or nearly isotropic crystals) `strohImagesApply` is false and
 * the isotropic corrections (surfaceRelaxation.ts) are used instead.
 */
import { type Vec3, cross, dot, unit } from '../math/vec3.js';
import type { DisplacementField } from './field.js';
import { stiffnessTensor } from './stiffness.js';
import { cinv3, cmul3, strohModes, type StrohModes } from './anisotropicDislocation.js';

function modesFor(stiffness_GPa: readonly number[], line: Vec3, normal: Vec3): StrohModes {
  const u = unit(line);
  const n = unit(normal);
  return strohModes(stiffnessTensor(stiffness_GPa), u, cross(n, u));
}

/** Whether the anisotropic images apply: a line parallel to the surfaces with well separated p. */
export function strohImagesApply(stiffness_GPa: readonly number[], line: Vec3, normal: Vec3): boolean {
  return modesFor(stiffness_GPa, line, normal).diagonal;
}

export interface StrohImagesOptions {
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  /** Unit foil normal; the foil is 0 <= r.n <= thickness_nm. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
  readonly stiffness_GPa: readonly number[];
  /** Tests only: leave out the image of one surface ('entrance': only eta = 0 is freed). */
  readonly only?: 'entrance' | 'exit';
}

/** The image coefficients of a line: its Stroh modes (frame m = n x u, n) and C[:, b] = B^-1 conj(B_b c_b) (row-major, alpha, beta). */
export interface StrohImageCoefficients {
  readonly modes: StrohModes;
  readonly Cr: Float64Array;
  readonly Ci: Float64Array;
}

export function strohImageCoefficients(b: Vec3, line: Vec3, normal: Vec3, stiffness_GPa: readonly number[]): StrohImageCoefficients {
  const md = modesFor(stiffness_GPa, line, normal);
  if (!md.diagonal) throw new Error('internal: the Stroh surface images need well separated Stroh eigenvalues');
  if (dot(md.n, unit(normal)) < 1 - 1e-9) throw new Error('internal: the Stroh frame must have n along the foil normal');
  const { lRe, lIm, giRe, giIm } = md;
  // c = G^-1 (B^T b)
  const lbr = [0, 0, 0], lbi = [0, 0, 0];
  for (let j = 0; j < 3; j++)
    for (let k = 0; k < 3; k++) {
      lbr[j] += lRe[k * 3 + j] * b[k];
      lbi[j] += lIm[k * 3 + j] * b[k];
    }
  const cr = [0, 0, 0], ci = [0, 0, 0];
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) {
      cr[i] += giRe[i * 3 + j] * lbr[j] - giIm[i * 3 + j] * lbi[j];
      ci[i] += giRe[i * 3 + j] * lbi[j] + giIm[i * 3 + j] * lbr[j];
    }
  // C[:, beta] = B^-1 conj(B[:, beta] c_beta); Cr/Ci row-major (alpha, beta)
  const Rr = new Float64Array(9), Ri = new Float64Array(9);
  for (let k = 0; k < 3; k++)
    for (let be = 0; be < 3; be++) {
      Rr[k * 3 + be] = lRe[k * 3 + be] * cr[be] - lIm[k * 3 + be] * ci[be];
      Ri[k * 3 + be] = -(lRe[k * 3 + be] * ci[be] + lIm[k * 3 + be] * cr[be]);
    }
  const [BinvR, BinvI] = cinv3(Float64Array.from(lRe), Float64Array.from(lIm));
  const [Cr, Ci] = cmul3(BinvR, BinvI, Rr, Ri);
  return { modes: md, Cr, Ci };
}

export function strohHalfSpaceImages(o: StrohImagesOptions): DisplacementField {
  const { modes: md, Cr, Ci } = strohImageCoefficients(o.b_nm, o.line, o.normal, o.stiffness_GPa);
  const n = unit(o.normal);
  const m = md.m;
  const t = o.thickness_nm;
  const { aRe, aIm, pRe, pIm } = md;
  const P = o.point_nm;
  const xi0 = dot(P, m);
  const d = dot(P, n);
  const useTop = o.only !== 'exit';
  const useBottom = o.only !== 'entrance';
  // constant parts of the arguments: top w = z_a - conj(p_b) d, bottom w = z_a - p_a t - conj(p_b)(d - t)
  const topR = new Float64Array(9), topI = new Float64Array(9), botR = new Float64Array(9), botI = new Float64Array(9);
  for (let al = 0; al < 3; al++)
    for (let be = 0; be < 3; be++) {
      topR[al * 3 + be] = -pRe[be] * d;
      topI[al * 3 + be] = pIm[be] * d;
      botR[al * 3 + be] = -pRe[al] * t - pRe[be] * (d - t);
      botI[al * 3 + be] = -pIm[al] * t + pIm[be] * (d - t);
    }
  const [m0, m1, m2] = m;
  const [n0, n1, n2] = n;
  const p0r = pRe[0], p1r = pRe[1], p2r = pRe[2], p0i = pIm[0], p1i = pIm[1], p2i = pIm[2];
  // S[ab] = 1/w_top + 1/w_bottom (complex) at a point, into sr/si
  const sr = new Float64Array(9), si = new Float64Array(9);
  const sums = (x: number, y: number, z: number): void => {
    const xi = x * m0 + y * m1 + z * m2 - xi0;
    const eta = x * n0 + y * n1 + z * n2;
    for (let al = 0; al < 3; al++) {
      const zr = xi + (al === 0 ? p0r : al === 1 ? p1r : p2r) * eta;
      const zi = (al === 0 ? p0i : al === 1 ? p1i : p2i) * eta;
      for (let be = 0; be < 3; be++) {
        const k = al * 3 + be;
        let accR = 0, accI = 0;
        if (useTop) {
          const wr = zr + topR[k], wi = zi + topI[k];
          const iw2 = 1 / (wr * wr + wi * wi);
          accR += wr * iw2;
          accI -= wi * iw2;
        }
        if (useBottom) {
          const wr = zr + botR[k], wi = zi + botI[k];
          const iw2 = 1 / (wr * wr + wi * wi);
          accR += wr * iw2;
          accI -= wi * iw2;
        }
        sr[k] = accR;
        si[k] = accI;
      }
    }
  };
  // per mode alpha and Cartesian component i: E[i][al] = sum_b A[i][al] C[al][b] S[al][b]
  const field: DisplacementField = {
    displacement(out, x, y, z) {
      const xi = x * m0 + y * m1 + z * m2 - xi0;
      const eta = x * n0 + y * n1 + z * n2;
      out[0] = 0;
      out[1] = 0;
      out[2] = 0;
      for (let al = 0; al < 3; al++) {
        const zr = xi + pRe[al] * eta;
        const zi = pIm[al] * eta;
        // sum_b C[al][b] (ln w_top + ln w_bottom)
        let hr = 0, hi = 0;
        for (let be = 0; be < 3; be++) {
          const k = al * 3 + be;
          let lr = 0, li = 0;
          if (useTop) {
            const wr = zr + topR[k], wi = zi + topI[k];
            lr += 0.5 * Math.log(wr * wr + wi * wi);
            li += Math.atan2(wi, wr);
          }
          if (useBottom) {
            const wr = zr + botR[k], wi = zi + botI[k];
            lr += 0.5 * Math.log(wr * wr + wi * wi);
            li += Math.atan2(wi, wr);
          }
          hr += Cr[k] * lr - Ci[k] * li;
          hi += Cr[k] * li + Ci[k] * lr;
        }
        for (let i = 0; i < 3; i++) out[i] += (aRe[i * 3 + al] * hi + aIm[i * 3 + al] * hr) / Math.PI;
      }
    },
    gradient(out, x, y, z) {
      sums(x, y, z);
      for (let i = 0; i < 9; i++) out[i] = 0;
      for (let al = 0; al < 3; al++) {
        let hr = 0, hi = 0;
        for (let be = 0; be < 3; be++) {
          const k = al * 3 + be;
          hr += Cr[k] * sr[k] - Ci[k] * si[k];
          hi += Cr[k] * si[k] + Ci[k] * sr[k];
        }
        // d/dx_j ln w = (m_j + p_al n_j) / w
        for (let j = 0; j < 3; j++) {
          const fr = m[j] + pRe[al] * n[j];
          const fi = pIm[al] * n[j];
          const qr = hr * fr - hi * fi;
          const qi = hr * fi + hi * fr;
          for (let i = 0; i < 3; i++) out[3 * i + j] += (aRe[i * 3 + al] * qi + aIm[i * 3 + al] * qr) / Math.PI;
        }
      }
    },
    directionalAt(g, k) {
      const [Kr, Ki] = contraction(g, k);
      return (q) => {
        sums(q[0], q[1], q[2]);
        let s = 0;
        for (let r = 0; r < 9; r++) s += Kr[r] * si[r] + Ki[r] * sr[r];
        q[3] = s;
      };
    },
    directional(g, k) {
      const [Kr, Ki] = contraction(g, k);
      return (x, y, z) => {
        sums(x, y, z);
        let s = 0;
        for (let q = 0; q < 9; q++) s += Kr[q] * si[q] + Ki[q] * sr[q];
        return s;
      };
    },
  };
  return field;

  /** K[al][b] = (g . A_al)(m.k + p_al n.k) C[al][b] / pi: g.(grad R).k = sum K_r Im S_r + K_i Re S_r. */
  function contraction(g: readonly [number, number, number], k: readonly [number, number, number]): [Float64Array, Float64Array] {
    // K[al][b] = (g . A_al)(m.k + p_al n.k) C[al][b] / pi
    const mk = dot(m, k as unknown as Vec3);
    const nk = dot(n, k as unknown as Vec3);
    const Kr = new Float64Array(9), Ki = new Float64Array(9);
    for (let al = 0; al < 3; al++) {
      const gar = g[0] * aRe[al] + g[1] * aRe[3 + al] + g[2] * aRe[6 + al];
      const gai = g[0] * aIm[al] + g[1] * aIm[3 + al] + g[2] * aIm[6 + al];
      const fr = mk + pRe[al] * nk;
      const fi = pIm[al] * nk;
      const er = gar * fr - gai * fi;
      const ei = gar * fi + gai * fr;
      for (let be = 0; be < 3; be++) {
        const q = al * 3 + be;
        Kr[q] = (er * Cr[q] - ei * Ci[q]) / Math.PI;
        Ki[q] = (er * Ci[q] + ei * Cr[q]) / Math.PI;
      }
    }
    return [Kr, Ki];
  }
}
