/**
 * Systematic-row helpers: beams n g for n = nMin..nMax along one reciprocal
 * lattice row (physics.md section 4).
 *
 *   excitation error of beam n g (parabolic approximation of the Ewald sphere):
 *       s_ng = n s_g + n (1 - n) lambda g^2 / 2
 *   weak-beam condition g(ng), Ewald sphere through n g (Cockayne, Ray &
 *   Whelan 1969; Williams & Carter):
 *       s_g = (n - 1) lambda g^2 / 2
 */
import { InternalError } from '../errors.js';
import type { ManyBeamInput } from './manyBeamStructureMatrix.js';

function checkRow(nMin: number, nMax: number): void {
  if (!Number.isInteger(nMin) || !Number.isInteger(nMax) || nMin > 0 || nMax < 0 || nMax <= nMin) {
    throw new InternalError(
      `beam orders ${nMin}..${nMax}: give integers nMin <= 0 <= nMax with at least two beams (e.g. -1..3).`,
    );
  }
}

function checkPositive(name: string, v: number): void {
  if (!(Number.isFinite(v) && v > 0)) throw new InternalError(`${name} is ${v}: give a positive number.`);
}

/**
 * Excitation errors s_ng (nm^-1) of the beams n = nMin..nMax of a systematic
 * row, index n - nMin; s_g is the excitation error of the fundamental g.
 */
export function systematicRowExcitationErrors(
  nMin: number,
  nMax: number,
  s_g: number,
  lambda_nm: number,
  g_per_nm: number,
): Float64Array {
  checkRow(nMin, nMax);
  checkPositive('lambda_nm', lambda_nm);
  checkPositive('g_per_nm', g_per_nm);
  if (!Number.isFinite(s_g)) throw new InternalError(`s_g is ${s_g}: give a finite excitation error in nm^-1.`);
  const out = new Float64Array(nMax - nMin + 1);
  const half = 0.5 * lambda_nm * g_per_nm * g_per_nm;
  for (let n = nMin; n <= nMax; n++) out[n - nMin] = n * s_g + n * (1 - n) * half;
  return out;
}

/**
 * Excitation error s_g (nm^-1) of the fundamental g that puts the Ewald sphere
 * through n g: the weak-beam condition g(ng), s_g = (n - 1) lambda g^2 / 2.
 */
export function weakBeamDeviation(n: number, lambda_nm: number, g_per_nm: number): number {
  if (!Number.isFinite(n)) throw new InternalError(`weak-beam order n is ${n}: give a finite number such as 3.`);
  checkPositive('lambda_nm', lambda_nm);
  checkPositive('g_per_nm', g_per_nm);
  return 0.5 * (n - 1) * lambda_nm * g_per_nm * g_per_nm;
}

/** A Fourier coefficient as [real, imaginary], nm^-2. */
export type ComplexPair = readonly [number, number];

/** What a systematic row needs besides the geometry. */
export interface SystematicRowSpec {
  readonly nMin: number;
  readonly nMax: number;
  /** excitation error of the fundamental g, nm^-1 */
  readonly s_g: number;
  readonly lambda_nm: number;
  /** |g| of the fundamental, nm^-1 */
  readonly g_per_nm: number;
  /** U_{m g} for an integer m (m = 0 is not used), nm^-2 */
  readonly potential: (m: number) => ComplexPair;
  /** U'_{m g} for an integer m, including m = 0 (normal absorption), nm^-2 */
  readonly absorption: (m: number) => ComplexPair;
}

/** Beam orders n = nMin..nMax as a Float64Array (the strain factors of the row). */
export function systematicRowOrders(nMin: number, nMax: number): Float64Array {
  checkRow(nMin, nMax);
  const out = new Float64Array(nMax - nMin + 1);
  for (let n = nMin; n <= nMax; n++) out[n - nMin] = n;
  return out;
}

/**
 * The many-beam input of a systematic row: excitation errors from
 * systematicRowExcitationErrors and the tables U_{(n_i - n_j) g},
 * U'_{(n_i - n_j) g}. The transmitted beam has index -nMin.
 */
export function systematicRowInput(spec: SystematicRowSpec): ManyBeamInput {
  const s = systematicRowExcitationErrors(spec.nMin, spec.nMax, spec.s_g, spec.lambda_nm, spec.g_per_nm);
  const n = s.length;
  const uR = new Float64Array(n * n);
  const uI = new Float64Array(n * n);
  const pR = new Float64Array(n * n);
  const pI = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const m = i - j;
      const ij = i * n + j;
      if (m !== 0) {
        const u = spec.potential(m);
        uR[ij] = u[0];
        uI[ij] = u[1];
      }
      const p = spec.absorption(m);
      pR[ij] = p[0];
      pI[ij] = p[1];
    }
  }
  return {
    excitationErrors_per_nm: s,
    potentialRe_per_nm2: uR,
    potentialIm_per_nm2: uI,
    absorptionRe_per_nm2: pR,
    absorptionIm_per_nm2: pI,
    waveNumber_per_nm: 1 / spec.lambda_nm,
  };
}
