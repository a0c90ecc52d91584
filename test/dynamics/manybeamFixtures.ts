/**
 * Helpers for the many-beam tests: reading the JSON fixtures written by
 * scripts/ref_manybeam_eigen.py and scripts/ref_manybeam_columns.py, and
 * small complex-vector utilities.
 */
import { readFileSync } from 'node:fs';
import type { ManyBeamInput } from '../../src/dynamics/manyBeamStructureMatrix.js';

export interface ComplexTable {
  re: number[];
  im: number[];
}

export function readFixture<T>(name: string): T {
  return JSON.parse(readFileSync(new URL(`../reference/${name}`, import.meta.url), 'utf8')) as T;
}

export interface FixtureInputs {
  excitationErrors_per_nm: number[];
  potential: ComplexTable;
  absorption: ComplexTable;
  waveNumber_per_nm: number;
}

export function toInput(f: FixtureInputs): ManyBeamInput {
  return {
    excitationErrors_per_nm: Float64Array.from(f.excitationErrors_per_nm),
    potentialRe_per_nm2: Float64Array.from(f.potential.re),
    potentialIm_per_nm2: Float64Array.from(f.potential.im),
    absorptionRe_per_nm2: Float64Array.from(f.absorption.re),
    absorptionIm_per_nm2: Float64Array.from(f.absorption.im),
    waveNumber_per_nm: f.waveNumber_per_nm,
  };
}

/** max |a_i - b_i| over interleaved complex vectors */
export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i += 2) m = Math.max(m, Math.hypot(a[i] - b[i], a[i + 1] - b[i + 1]));
  return m;
}

/** sum |phi_g|^2 of an interleaved amplitude vector */
export function totalIntensity(phi: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < phi.length; i++) s += phi[i] * phi[i];
  return s;
}

/**
 * Invented, realistic test potentials for a systematic row (NOT measured
 * data): U_mg = 8 nm^-2 exp(-0.45 (|m|-1)) e^{i phase m}, i.e. xi_g = K/U_g of
 * about 50 nm at 200 kV for the fundamental, decreasing with order; the
 * absorptive part U'_mg = ratio * U_mg (ratio 0.1 is the common practice of
 * Hirsch et al. 1965), with U'_0 = U'_g (normal absorption xi'_0 = xi'_g).
 */
export function inventedPotential(phase = 0): (m: number) => readonly [number, number] {
  return (m: number) => {
    const a = 8 * Math.exp(-0.45 * (Math.abs(m) - 1));
    return [a * Math.cos(phase * m), a * Math.sin(phase * m)];
  };
}

export function inventedAbsorption(ratio = 0.1, phase = 0): (m: number) => readonly [number, number] {
  return (m: number) => {
    const a = ratio * 8 * Math.exp(-0.45 * ((m === 0 ? 1 : Math.abs(m)) - 1));
    return [a * Math.cos(phase * m), a * Math.sin(phase * m)];
  };
}

/** 200 kV wavelength (physics.md section 1 check value) and an invented fundamental |g| */
export const LAMBDA_200KV_NM = 0.0025079;
export const G_200_PER_NM = 5.53;
