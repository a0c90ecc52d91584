/**
 * Intensity of one Bloch wave across one period of the lattice planes of a
 * systematic row: |sum_i C_i exp(2 pi i n_i g x)|^2 for x in [0, d), d = 1/|g|,
 * x measured along g from a plane through the origin (physics.md section 3:
 * for U_g > 0 the atomic planes sit at x = 0, d, ...).
 */
import { InternalError } from '../errors.js';
import type { BlochWaves } from './blochWaves.js';

/**
 * Fill out[k] with the intensity of Bloch wave `wave` at x_k = k d / out.length
 * (k = 0..out.length-1). `orders[i]` is the order n_i of beam i along the row
 * (e.g. systematicRowOrders(-1, 3)). Returns out.
 */
export function blochWaveProfile(out: Float64Array, waves: BlochWaves, wave: number, orders: Float64Array): Float64Array {
  const n = waves.n;
  if (!Number.isInteger(wave) || wave < 0 || wave >= n) {
    throw new InternalError(`Bloch wave index ${wave}: give an integer from 0 to ${n - 1}.`);
  }
  if (orders.length !== n) throw new InternalError(`orders has ${orders.length} entries: give one order per beam (${n}).`);
  if (out.length < 1) throw new InternalError('the profile array is empty: give at least one sample.');
  const samples = out.length;
  for (let k = 0; k < samples; k++) {
    const f = (2 * Math.PI * k) / samples; // 2 pi g x
    let sr = 0;
    let si = 0;
    for (let i = 0; i < n; i++) {
      const a = waves.cRe[i * n + wave];
      const b = waves.cIm[i * n + wave];
      const c = Math.cos(orders[i] * f);
      const s = Math.sin(orders[i] * f);
      sr += a * c - b * s;
      si += a * s + b * c;
    }
    out[k] = sr * sr + si * si;
  }
  return out;
}
