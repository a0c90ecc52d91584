/**
 * Curves of `thinfoil bloch`, all for a perfect crystal with the
 * transmitted beam incident (physics.md section 4,
 * phi(t) = C diag(exp(2 pi i gamma^(j) t)) C^-1 phi(0)):
 * - beam intensities against thickness at fixed s (bright field = beam 0,
 *   dark field = beam g),
 * - beam intensities against s at fixed thickness (rocking curve),
 * - the intensity of every Bloch wave across one period of the planes.
 */
import { amplitudesAt } from '../dynamics/blochWaves.js';
import { blochWaveProfile } from '../dynamics/blochWaveProfile.js';
import { InternalError } from '../errors.js';
import { blochRowWaves, type BlochRow } from '../imaging/blochRow.js';

/** n evenly spaced values from a to b inclusive. */
export function linspace(a: number, b: number, n: number): Float64Array {
  if (!(Number.isInteger(n) && n >= 2)) throw new RangeError(`linspace needs at least 2 points, got ${n}`);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = a + ((b - a) * i) / (n - 1);
  out[n - 1] = b;
  return out;
}

/** Intensity of every beam (index as in row.orders) at every thickness, s_g fixed. */
export function thicknessCurves(row: BlochRow, s_g: number, thicknesses_nm: Float64Array): Float64Array[] {
  const waves = blochRowWaves(row, s_g);
  const n = waves.n;
  const out = Array.from({ length: n }, () => new Float64Array(thicknesses_nm.length));
  const phi = new Float64Array(2 * n);
  thicknesses_nm.forEach((t, k) => {
    amplitudesAt(phi, waves, t);
    for (let i = 0; i < n; i++) out[i][k] = phi[2 * i] * phi[2 * i] + phi[2 * i + 1] * phi[2 * i + 1];
  });
  return out;
}

/** Intensity of every beam at thickness t for every s_g (nm^-1) of the list: the rocking curve. */
export function rockingCurves(row: BlochRow, s_values: Float64Array, thickness_nm: number): Float64Array[] {
  if (!(Number.isFinite(thickness_nm) && thickness_nm >= 0)) {
    throw new InternalError(`thickness ${thickness_nm} nm: give a non-negative thickness in nm.`);
  }
  const n = row.beams;
  const out = Array.from({ length: n }, () => new Float64Array(s_values.length));
  const phi = new Float64Array(2 * n);
  s_values.forEach((s, k) => {
    amplitudesAt(phi, blochRowWaves(row, s), thickness_nm);
    for (let i = 0; i < n; i++) out[i][k] = phi[2 * i] * phi[2 * i] + phi[2 * i + 1] * phi[2 * i + 1];
  });
  return out;
}

/**
 * Intensity of every Bloch wave (unit-norm, waves in order of decreasing
 * Re gamma) across one period: x/d = k / samples for k = 0..samples (both
 * ends, the last equal to the first).
 */
export function waveProfiles(row: BlochRow, s_g: number, samples: number): { x_over_d: Float64Array; intensity: Float64Array[] } {
  if (!(Number.isInteger(samples) && samples >= 2)) throw new RangeError(`waveProfiles needs at least 2 samples, got ${samples}`);
  const waves = blochRowWaves(row, s_g);
  const x = new Float64Array(samples + 1);
  for (let k = 0; k <= samples; k++) x[k] = k / samples;
  const intensity: Float64Array[] = [];
  const buf = new Float64Array(samples);
  for (let j = 0; j < waves.n; j++) {
    blochWaveProfile(buf, waves, j, row.orders);
    const full = new Float64Array(samples + 1);
    full.set(buf);
    full[samples] = buf[0];
    intensity.push(full);
  }
  return { x_over_d: x, intensity };
}
