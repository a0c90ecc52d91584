/**
 * Bloch waves of a perfect crystal in the many-beam form (physics.md
 * section 4): the eigenvalues gamma^(j) and eigenvectors C^(j) of the
 * structure matrix A, the excitations alpha^(j) = (C^-1 phi(0))_j, and the
 * amplitudes at depth t,
 *
 *     phi(t) = C diag(exp(2 pi i gamma^(j) t)) C^-1 phi(0).
 *
 * Wave j varies with depth as exp(2 pi i gamma^(j) z): Im gamma^(j) > 0 is
 * its absorption; its amplitude falls by 1/e over 1/(2 pi Im gamma^(j)) and
 * its intensity over half that.
 *
 * Amplitude vectors (phi) are interleaved [re_0, im_0, re_1, im_1, ...];
 * matrices are row-major with separate real and imaginary arrays; Bloch wave
 * j is column j of C. Waves are sorted by decreasing Re gamma.
 */
import { InternalError } from '../errors.js';
import { complexEigen, complexInverse } from './complexEigen.js';
import { structureMatrix, type ManyBeamInput } from './manyBeamStructureMatrix.js';

export interface BlochWaves {
  /** number of beams (and of Bloch waves) */
  readonly n: number;
  /** eigenvalues gamma^(j), nm^-1 */
  readonly gammaRe_per_nm: Float64Array;
  readonly gammaIm_per_nm: Float64Array;
  /** eigenvector matrix C (wave j = column j), unit 2-norm columns */
  readonly cRe: Float64Array;
  readonly cIm: Float64Array;
  /** C^-1 */
  readonly cInvRe: Float64Array;
  readonly cInvIm: Float64Array;
  /** excitations alpha^(j) = (C^-1 phi(0))_j */
  readonly excitationRe: Float64Array;
  readonly excitationIm: Float64Array;
}

/**
 * Solve for the Bloch waves of the beam set. `incident` is the index of the
 * transmitted beam (phi(0) = e_incident) or a full interleaved phi(0).
 */
export function blochWaves(input: ManyBeamInput, incident: number | Float64Array): BlochWaves {
  const n = input.excitationErrors_per_nm.length;
  const aRe = new Float64Array(n * n);
  const aIm = new Float64Array(n * n);
  structureMatrix(aRe, aIm, input);
  const phi0 = incidentVector(n, incident);
  return blochWavesOfMatrix(n, aRe, aIm, phi0);
}

/** phi(0) as an interleaved vector, from a beam index or a given vector. */
export function incidentVector(n: number, incident: number | Float64Array): Float64Array {
  if (typeof incident === 'number') {
    if (!Number.isInteger(incident) || incident < 0 || incident >= n) {
      throw new InternalError(`incident beam index ${incident}: give an integer from 0 to ${n - 1}.`);
    }
    const v = new Float64Array(2 * n);
    v[2 * incident] = 1;
    return v;
  }
  if (incident.length !== 2 * n) {
    throw new InternalError(`incident amplitudes have ${incident.length} numbers: give 2N = ${2 * n} (re, im per beam).`);
  }
  for (let i = 0; i < incident.length; i++) {
    if (!Number.isFinite(incident[i])) throw new InternalError(`incident amplitudes[${i}] is not finite: give finite numbers.`);
  }
  return Float64Array.from(incident);
}

/** Bloch waves of an explicit structure matrix (row-major re/im). */
export function blochWavesOfMatrix(n: number, aRe: Float64Array, aIm: Float64Array, phi0: Float64Array): BlochWaves {
  const eig = complexEigen(n, aRe, aIm);
  // sort by decreasing Re gamma (ties: decreasing Im gamma)
  const order = Array.from({ length: n }, (_, i) => i).sort(
    (a, b) => eig.valuesRe[b] - eig.valuesRe[a] || eig.valuesIm[b] - eig.valuesIm[a],
  );
  const gammaRe = new Float64Array(n);
  const gammaIm = new Float64Array(n);
  const cRe = new Float64Array(n * n);
  const cIm = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const src = order[j];
    gammaRe[j] = eig.valuesRe[src];
    gammaIm[j] = eig.valuesIm[src];
    // fix the phase: the largest component real and positive
    let big = 0;
    let br = 1;
    let bi = 0;
    for (let i = 0; i < n; i++) {
      const r = eig.vectorsRe[i * n + src];
      const m = eig.vectorsIm[i * n + src];
      const a = r * r + m * m;
      if (a > big * (1 + 1e-12)) {
        big = a;
        br = r;
        bi = m;
      }
    }
    const babs = Math.hypot(br, bi);
    const pr = br / babs;
    const pi = -bi / babs; // multiply by conj(phase)
    for (let i = 0; i < n; i++) {
      const r = eig.vectorsRe[i * n + src];
      const m = eig.vectorsIm[i * n + src];
      cRe[i * n + j] = r * pr - m * pi;
      cIm[i * n + j] = r * pi + m * pr;
    }
  }
  const cInvRe = new Float64Array(n * n);
  const cInvIm = new Float64Array(n * n);
  complexInverse(cInvRe, cInvIm, n, cRe, cIm);
  const excitationRe = new Float64Array(n);
  const excitationIm = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let sr = 0;
    let si = 0;
    for (let i = 0; i < n; i++) {
      const a = cInvRe[j * n + i];
      const b = cInvIm[j * n + i];
      sr += a * phi0[2 * i] - b * phi0[2 * i + 1];
      si += a * phi0[2 * i + 1] + b * phi0[2 * i];
    }
    excitationRe[j] = sr;
    excitationIm[j] = si;
  }
  return {
    n,
    gammaRe_per_nm: gammaRe,
    gammaIm_per_nm: gammaIm,
    cRe,
    cIm,
    cInvRe,
    cInvIm,
    excitationRe,
    excitationIm,
  };
}

/**
 * Amplitudes phi(t) = sum_j C^(j) alpha^(j) exp(2 pi i gamma^(j) t) of a
 * perfect crystal of thickness t (nm), written interleaved into out (2N).
 */
export function amplitudesAt(out: Float64Array, waves: BlochWaves, thickness_nm: number): Float64Array {
  if (!(Number.isFinite(thickness_nm) && thickness_nm >= 0)) {
    throw new InternalError(`thickness_nm is ${thickness_nm}: give a non-negative thickness in nm.`);
  }
  const n = waves.n;
  out.fill(0, 0, 2 * n);
  const tp = 2 * Math.PI * thickness_nm;
  for (let j = 0; j < n; j++) {
    // e = alpha_j exp(2 pi i gamma_j t)
    const mag = Math.exp(-tp * waves.gammaIm_per_nm[j]);
    const ph = tp * waves.gammaRe_per_nm[j];
    const cr = mag * Math.cos(ph);
    const ci = mag * Math.sin(ph);
    const er = waves.excitationRe[j] * cr - waves.excitationIm[j] * ci;
    const ei = waves.excitationRe[j] * ci + waves.excitationIm[j] * cr;
    for (let i = 0; i < n; i++) {
      const a = waves.cRe[i * n + j];
      const b = waves.cIm[i * n + j];
      out[2 * i] += a * er - b * ei;
      out[2 * i + 1] += a * ei + b * er;
    }
  }
  return out;
}

/**
 * Depth (nm) over which the amplitude of Bloch wave j falls by 1/e:
 * 1 / (2 pi Im gamma^(j)). Infinity for a wave without absorption.
 */
export function blochAmplitudeDecayLength_nm(waves: BlochWaves, j: number): number {
  const g = waves.gammaIm_per_nm[j];
  return g > 0 ? 1 / (2 * Math.PI * g) : Infinity;
}
