/**
 * The structure matrix A of the many-beam Howie-Whelan equations for a
 * perfect crystal (physics.md section 4):
 *
 *     dphi/dz = 2 pi i A phi
 *     A_gg = s_g + i U'_0 / (2K)
 *     A_gh = (U_{g-h} + i U'_{g-h}) / (2K)      (g != h)
 *
 * U and U' (the absorptive potential) are complex Fourier coefficients in
 * nm^-2 (complex for non-centrosymmetric crystals); K = 1/lambda in nm^-1.
 * The strain term g.dR/dz of A_gg is added by the column integrator.
 *
 * Two beams reduce to the two-beam equations of physics.md section 3:
 * A_0g = U_g/(2K) + i U'_g/(2K) = q/2 with q = 1/xi_g + i/xi'_g, because
 * xi_g = K/|U_g| = 1/(lambda |U_g|) and xi'_g = K/U'_g.
 */
import { InternalError } from '../errors.js';

/** A set of N beams: the data the structure matrix is built from. */
export interface ManyBeamInput {
  /** excitation error s of each beam, nm^-1 (0 for the transmitted beam) */
  readonly excitationErrors_per_nm: Float64Array;
  /**
   * U_{g_i - g_j} (elastic part of the optical potential), nm^-2, real and
   * imaginary parts, N x N row-major. The diagonal (U_0) is not used.
   */
  readonly potentialRe_per_nm2: Float64Array;
  readonly potentialIm_per_nm2: Float64Array;
  /**
   * U'_{g_i - g_j} (absorptive part), nm^-2, N x N row-major; the diagonal
   * holds U'_0 (normal absorption).
   */
  readonly absorptionRe_per_nm2: Float64Array;
  readonly absorptionIm_per_nm2: Float64Array;
  /** K = 1/lambda, nm^-1 */
  readonly waveNumber_per_nm: number;
}

/** Number of beams of an input, after checking that its arrays agree. */
export function beamCount(input: ManyBeamInput): number {
  const n = input.excitationErrors_per_nm.length;
  if (n < 1) throw new InternalError('excitationErrors_per_nm is empty: give at least one beam.');
  const tables: Array<[string, Float64Array]> = [
    ['potentialRe_per_nm2', input.potentialRe_per_nm2],
    ['potentialIm_per_nm2', input.potentialIm_per_nm2],
    ['absorptionRe_per_nm2', input.absorptionRe_per_nm2],
    ['absorptionIm_per_nm2', input.absorptionIm_per_nm2],
  ];
  for (const [name, t] of tables) {
    if (t.length !== n * n) {
      throw new InternalError(`${name} has ${t.length} entries: it must be an N x N table with N = ${n} (${n * n} entries).`);
    }
    for (let i = 0; i < t.length; i++) {
      if (!Number.isFinite(t[i])) throw new InternalError(`${name}[${i}] is not a finite number: give a finite potential coefficient.`);
    }
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(input.excitationErrors_per_nm[i])) {
      throw new InternalError(`excitationErrors_per_nm[${i}] is not a finite number: give a finite excitation error.`);
    }
  }
  const k = input.waveNumber_per_nm;
  if (!(Number.isFinite(k) && k > 0)) {
    throw new InternalError(`waveNumber_per_nm is ${k}: give K = 1/lambda as a positive number in nm^-1.`);
  }
  return n;
}

/**
 * Write the N x N structure matrix A (without strain) into (outRe, outIm),
 * row-major. Returns N.
 */
export function structureMatrix(outRe: Float64Array, outIm: Float64Array, input: ManyBeamInput): number {
  const n = beamCount(input);
  const inv2k = 1 / (2 * input.waveNumber_per_nm);
  const uR = input.potentialRe_per_nm2;
  const uI = input.potentialIm_per_nm2;
  const pR = input.absorptionRe_per_nm2;
  const pI = input.absorptionIm_per_nm2;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const ij = i * n + j;
      if (i === j) {
        // s + i U'_0 / (2K)
        outRe[ij] = input.excitationErrors_per_nm[i] - pI[ij] * inv2k;
        outIm[ij] = pR[ij] * inv2k;
      } else {
        // (U + i U') / (2K)
        outRe[ij] = (uR[ij] - pI[ij]) * inv2k;
        outIm[ij] = (uI[ij] + pR[ij]) * inv2k;
      }
    }
  }
  return n;
}
