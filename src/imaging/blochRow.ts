/**
 * The beam set of `thinfoil bloch`: two beams (0, g) or a systematic row
 * n g, n = -m..m, of one reflection g of a library material, with the
 * Fourier coefficients of the optical potential that the many-beam
 * structure matrix needs (physics.md sections 2 and 4).
 *
 * Absorption, kept consistent with the two-beam engine (reflection.ts):
 *   U'_{ng} for n != 0 from opticalPotential_per_nm2: the thermal-diffuse
 *   model's own value for every order (default), or r U_{ng} with a constant
 *   ratio r = xi_g / xi'_g (Hirsch et al. 1965);
 *   U'_0 = K / xi'_0 (normalAbsorption_per_nm2) with xi'_0 of the reflection:
 *   the model's normal absorption, or xi'_g of the fundamental g with a ratio.
 * With two beams the structure matrix is then exactly the two-beam matrix of
 * physics.md section 3 (q = 1/xi_g + i/xi'_g, normal absorption 1/xi'_0) for
 * a centrosymmetric crystal (U'_g in phase with U_g).
 */
import type { Material } from '../crystal/material.js';
import type { Vec3 } from '../math/vec3.js';
import { InputError, InternalError } from '../errors.js';
import { blochWaves, type BlochWaves } from '../dynamics/blochWaves.js';
import type { ManyBeamInput } from '../dynamics/manyBeamStructureMatrix.js';
import { systematicRowInput, systematicRowOrders, type ComplexPair } from '../dynamics/manyBeamSystematicRow.js';
import {
  type AbsorptionSetting,
  normalAbsorption_per_nm2,
  opticalPotential_per_nm2,
  reflectionParameters,
  type ReflectionParameters,
} from '../scattering/reflection.js';

/** Largest beam count accepted (a systematic row -20..20). */
export const MAX_BEAMS = 41;

export interface BlochRow {
  readonly material: Material;
  readonly hkl: Vec3;
  readonly kV: number;
  /** the absorption setting: "thermal-diffuse" or a constant ratio */
  readonly absorptionSetting: AbsorptionSetting;
  /** xi_g / xi'_g of the fundamental g (the ratio itself, or the model's value) */
  readonly absorptionRatio: number;
  /** the fundamental reflection g (xi_g, xi'_g, lambda, |g|, ...) */
  readonly reflection: ReflectionParameters;
  /** number of beams N */
  readonly beams: number;
  readonly nMin: number;
  readonly nMax: number;
  /** order n of every beam, index i = n - nMin */
  readonly orders: Float64Array;
  /** index of the transmitted beam 000 */
  readonly incident: number;
  /** index of the beam g (n = 1), the dark-field beam */
  readonly darkField: number;
  /** U_{mg} (nm^-2) for m = -(N-1)..(N-1), including m = 0 */
  potential(m: number): ComplexPair;
  /** U'_{mg} (nm^-2); m = 0 gives the normal absorption U'_0 = K / xi'_0 */
  absorption(m: number): ComplexPair;
}

/** Beam orders of a beam count: 2 -> (0, 1); odd N = 2m + 1 -> -m..m. InputError otherwise. */
export function rowOrders(beams: number): { nMin: number; nMax: number } {
  if (!Number.isInteger(beams) || beams < 2 || beams > MAX_BEAMS || (beams !== 2 && beams % 2 === 0)) {
    throw new InputError(
      `--beams ${beams}: give 2 for two-beam or an odd number from 3 to ${MAX_BEAMS} for a systematic row -m g .. m g.`,
    );
  }
  if (beams === 2) return { nMin: 0, nMax: 1 };
  const m = (beams - 1) / 2;
  return { nMin: -m, nMax: m };
}

function checkedRange(r: { nMin: number; nMax: number }): { nMin: number; nMax: number } {
  const { nMin, nMax } = r;
  if (!Number.isInteger(nMin) || !Number.isInteger(nMax) || nMin > 0 || nMax < 1 || nMax - nMin + 1 > MAX_BEAMS) {
    throw new InputError(`systematic row ${nMin}..${nMax}: give whole orders with nMin <= 0 < nMax and at most ${MAX_BEAMS} beams.`);
  }
  return { nMin, nMax };
}

/**
 * Set up the beams of reflection hkl: a beam count (see rowOrders) or the orders nMin..nMax of a row
 * (nMin <= 0 < nMax, e.g. -3..5 for a weak beam g(3g)); InputError for g = 000, a forbidden g or a bad beam count.
 */
export function blochRow(material: Material, hkl: Vec3, kV: number, absorption: AbsorptionSetting, beamsOrRange: number | { nMin: number; nMax: number }): BlochRow {
  const { nMin, nMax } = typeof beamsOrRange === 'number' ? rowOrders(beamsOrRange) : checkedRange(beamsOrRange);
  const beams = nMax - nMin + 1;
  const reflection = reflectionParameters(material, hkl, kV, { absorption });
  const u0abs = normalAbsorption_per_nm2(reflection.lambda_nm, reflection.xiAbs0_nm);
  const cacheU = new Map<number, ComplexPair>();
  const cacheA = new Map<number, ComplexPair>();
  const coefficients = (m: number): void => {
    const p = opticalPotential_per_nm2(material, [m * hkl[0], m * hkl[1], m * hkl[2]], kV, absorption);
    cacheU.set(m, [p.re, p.im]);
    cacheA.set(m, m === 0 ? [u0abs, 0] : [p.absRe, p.absIm]);
  };
  return {
    material,
    hkl: [hkl[0], hkl[1], hkl[2]],
    kV,
    absorptionSetting: absorption,
    absorptionRatio: reflection.absorptionRatio,
    reflection,
    beams,
    nMin,
    nMax,
    orders: systematicRowOrders(nMin, nMax),
    incident: -nMin,
    darkField: 1 - nMin,
    potential(m) {
      if (!cacheU.has(m)) coefficients(m);
      return cacheU.get(m)!;
    },
    absorption(m) {
      if (!cacheA.has(m)) coefficients(m);
      return cacheA.get(m)!;
    },
  };
}

/** The many-beam input at excitation error s_g (nm^-1) of the fundamental g. */
export function blochRowInput(row: BlochRow, s_g: number): ManyBeamInput {
  if (!Number.isFinite(s_g)) throw new InternalError(`deviation parameter s = ${s_g}: give a finite number in nm^-1.`);
  // two beams (orders 0, 1): s_0 = 0 and s_g exactly, the Ewald-sphere term n (1 - n) vanishes
  return systematicRowInput({
    nMin: row.nMin,
    nMax: row.nMax,
    s_g,
    lambda_nm: row.reflection.lambda_nm,
    g_per_nm: row.reflection.g_per_nm,
    potential: (m) => row.potential(m),
    absorption: (m) => row.absorption(m),
  });
}

/** Bloch waves at s_g with the transmitted beam incident (sorted by decreasing Re gamma). */
export function blochRowWaves(row: BlochRow, s_g: number): BlochWaves {
  return blochWaves(blochRowInput(row, s_g), row.incident);
}

/** Display name of beam order n: "0" for the transmitted beam, "g", "-g", "2g", ... */
export function beamName(n: number): string {
  if (n === 0) return '0';
  if (n === 1) return 'g';
  if (n === -1) return '-g';
  return `${n}g`;
}
