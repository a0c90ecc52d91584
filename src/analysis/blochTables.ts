/**
 * The table of Bloch waves of a beam set (physics.md sections 3 and 4):
 * eigenvalue gamma^(j), absorption, excitation alpha^(j) = (C^-1 phi(0))_j,
 * the amplitude of every beam in the wave, and whether the wave's intensity
 * peaks on the atomic planes or between them.
 *
 * Where the atomic planes are: at the maxima of the projected potential
 * V(x) = Re sum_m U_{mg} exp(2 pi i m x / d) across one period d of the
 * planes, in the same frame in which the Bloch wave's intensity
 * |sum_n C_n exp(2 pi i n x / d)|^2 is evaluated (blochWaveProfile.ts), so the
 * two are compared consistently whatever the phase of U_g. For U_g real and
 * positive (an atom at the origin of a centrosymmetric cell) the planes sit
 * at x = 0.
 */
import type { BlochWaves } from '../dynamics/blochWaves.js';
import { blochWaveProfile } from '../dynamics/blochWaveProfile.js';
import { blochRowWaves, type BlochRow } from '../imaging/blochRow.js';

/**
 * Harmonics |m| <= this enter the projected potential used to place the
 * planes, and never beyond sin(theta)/lambda = m / (2 d) = 2 A^-1, the range
 * of the scattering-factor fits (physics.md section 2).
 */
export const PLANE_HARMONICS = 12;

/** Number of harmonics of the projected potential for the row. */
export function planeHarmonics(row: BlochRow): number {
  const d_A = row.reflection.d_nm * 10;
  return Math.max(1, Math.min(PLANE_HARMONICS, Math.floor(4 * d_A)));
}
/** Samples per period when locating the planes and comparing intensities. */
const PERIOD_SAMPLES = 720;

export type WaveSite = 'on planes' | 'between planes';

export interface BlochWaveRow {
  /** 1-based, waves in order of decreasing Re gamma */
  readonly j: number;
  readonly gammaRe_per_nm: number;
  readonly gammaIm_per_nm: number;
  /** depth over which the wave's intensity falls by 1/e, 1/(4 pi Im gamma); Infinity without absorption */
  readonly absorptionLength_nm: number;
  readonly excitationRe: number;
  readonly excitationIm: number;
  /** |alpha^(j)| */
  readonly excitationAbs: number;
  /** the wave's intensity at the atomic planes over its mean across the period (> 1: peaks on the planes) */
  readonly planeIntensityRatio: number;
  readonly site: WaveSite;
  /** C_n^(j), the amplitude of beam n g in the wave (unit 2-norm over the beams, largest component real) */
  readonly amplitudes: readonly { readonly order: number; readonly re: number; readonly im: number }[];
}

export interface BlochTable {
  /** s of the fundamental g, nm^-1 */
  readonly s_per_nm: number;
  /** positions of the atomic planes, x/d in [0, 1) */
  readonly planes: readonly number[];
  readonly waves: readonly BlochWaveRow[];
}

/**
 * The projected potential V(x) = Re sum_{|m| <= harmonics} U_{mg} e^{2 pi i m x}
 * (x in units of d) at `samples` points x = k / samples.
 */
export function projectedPotential(row: BlochRow, samples: number, harmonics = planeHarmonics(row)): Float64Array {
  const out = new Float64Array(samples);
  for (let m = -harmonics; m <= harmonics; m++) {
    if (m === 0) continue;
    const [ur, ui] = row.potential(m);
    if (ur === 0 && ui === 0) continue;
    for (let k = 0; k < samples; k++) {
      const ph = (2 * Math.PI * m * k) / samples;
      out[k] += ur * Math.cos(ph) - ui * Math.sin(ph);
    }
  }
  return out;
}

/**
 * Positions x/d in [0, 1) of the atomic planes: the local maxima of the
 * projected potential that rise above half its range (refined by a parabola
 * through the three samples about each maximum).
 */
export function planePositions(row: BlochRow, samples = PERIOD_SAMPLES): number[] {
  const v = projectedPotential(row, samples);
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of v) {
    lo = Math.min(lo, x);
    hi = Math.max(hi, x);
  }
  const out: number[] = [];
  if (!(hi > lo)) return [0];
  for (let k = 0; k < samples; k++) {
    const a = v[(k - 1 + samples) % samples];
    const b = v[k];
    const c = v[(k + 1) % samples];
    if (b > a && b >= c && b >= lo + 0.5 * (hi - lo)) {
      const den = a - 2 * b + c;
      const off = den < 0 ? (0.5 * (a - c)) / den : 0;
      out.push((((k + off) / samples) % 1 + 1) % 1);
    }
  }
  return out.sort((p, q) => p - q);
}

/** Intensity of a Bloch wave at x/d by direct summation (unit-norm wave). */
function waveIntensityAt(waves: BlochWaves, j: number, orders: Float64Array, x: number): number {
  const n = waves.n;
  let sr = 0;
  let si = 0;
  for (let i = 0; i < n; i++) {
    const ph = 2 * Math.PI * orders[i] * x;
    const a = waves.cRe[i * n + j];
    const b = waves.cIm[i * n + j];
    sr += a * Math.cos(ph) - b * Math.sin(ph);
    si += a * Math.sin(ph) + b * Math.cos(ph);
  }
  return sr * sr + si * si;
}

/** The Bloch-wave table of the row at s_g (nm^-1). */
export function blochTable(row: BlochRow, s_g: number): BlochTable {
  const waves = blochRowWaves(row, s_g);
  const planes = planePositions(row);
  const n = waves.n;
  const profile = new Float64Array(PERIOD_SAMPLES);
  const rows: BlochWaveRow[] = [];
  for (let j = 0; j < n; j++) {
    blochWaveProfile(profile, waves, j, row.orders);
    let mean = 0;
    for (const p of profile) mean += p;
    mean /= profile.length;
    let onPlanes = 0;
    for (const x of planes) onPlanes += waveIntensityAt(waves, j, row.orders, x);
    onPlanes /= planes.length;
    const ratio = mean > 0 ? onPlanes / mean : 1;
    const gi = waves.gammaIm_per_nm[j];
    const ar = waves.excitationRe[j];
    const ai = waves.excitationIm[j];
    rows.push({
      j: j + 1,
      gammaRe_per_nm: waves.gammaRe_per_nm[j],
      gammaIm_per_nm: gi,
      // Im gamma at round-off level (no absorption) means no absorption, not a length of 1e17 nm
      absorptionLength_nm: gi > 1e-12 ? 1 / (4 * Math.PI * gi) : Infinity,
      excitationRe: ar,
      excitationIm: ai,
      excitationAbs: Math.hypot(ar, ai),
      planeIntensityRatio: ratio,
      site: ratio > 1 ? 'on planes' : 'between planes',
      amplitudes: Array.from(row.orders, (order, i) => ({ order, re: waves.cRe[i * n + j], im: waves.cIm[i * n + j] })),
    });
  }
  return { s_per_nm: s_g, planes, waves: rows };
}
