/**
 * Two-beam parameters of a reflection g = (hkl) and the Fourier coefficients
 * of the optical potential for any g (including 000).
 *
 *   U_g   = gamma F_g / (pi Vc)            (nm^-2; F_g in nm, Vc in nm^3)
 *   xi_g  = 1 / (lambda |U_g|) = pi Vc / (lambda gamma |F_g|)
 *           (times cos(thetaB) with options.cosThetaFactor, as Hirsch,
 *            Howie, Nicholson, Pashley & Whelan 1965 define it; default off)
 *
 * Absorption (AbsorptionSetting, absorption.ts), one of:
 *  - "thermal-diffuse" (default): U'_g from the thermal-diffuse-scattering
 *    absorptive form factors of every site (Einstein model, absorption.ts),
 *    its own value for every g, and the normal absorption U'_0 from the same
 *    model (g = 0). xi'_g = 1 / (lambda U'_g,in phase), where U'_g,in phase is the
 *    part of U'_g in phase with U_g (all of it in a centrosymmetric crystal;
 *    the many-beam engine uses the complex U'_g itself), xi'_0 = 1 / (lambda U'_0).
 *  - a number r = xi_g / xi'_g in 0..1: U'_g = r U_g (common practice,
 *    Hirsch et al. 1965), xi'_g = xi_g / r, xi'_0 = xi'_g of the imaging
 *    reflection (common approximation).
 * In both, the normal absorption enters the equations as U'_0 = K / xi'_0
 * (normalAbsorption_per_nm2) and every other pair as opticalPotential_per_nm2(...).abs*.
 *
 * A reflection whose |F_g| vanishes by symmetry (below 1e-6 of
 * sum_j occ_j |fe_j| exp(-B_j s^2)) is refused with an InputError by
 * reflectionParameters; opticalPotential_per_nm2 returns an exact 0 for it,
 * U' included (many-beam sets need U_{g-h} for every pair, forbidden or not).
 */
import type { Material } from '../crystal/material.js';
import { S_MAX_FITTED_perA } from './scatteringFactor.js';
import { cellVolume_nm3, gLength_per_nm } from '../crystal/lattice.js';
import type { Vec3 } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type Complex, checkMillerIndices, structureFactorInto } from './structureFactor.js';
import { braggAngle_rad, checkVoltage_kV, relativisticGamma, wavelength_nm } from './wavelength.js';
import {
  type AbsorptionSetting,
  checkAbsorptionSetting,
  DEFAULT_ABSORPTION,
  tdsPotentialFactor_per_nm2,
  tdsStructureSumInto,
} from './absorption.js';

export type { AbsorptionSetting } from './absorption.js';

/** |F_g| below this fraction of sum_j occ_j |fe_j| exp(-B_j s^2) counts as a symmetry zero. */
export const FORBIDDEN_RELATIVE_TOLERANCE = 1e-6;
/** The usual constant ratio r = xi_g / xi'_g when a ratio is wanted (common practice, Hirsch et al. 1965); not the default any more. */
export const DEFAULT_ABSORPTION_RATIO = 0.1;

export interface ReflectionOptions {
  /** "thermal-diffuse" (default) or a ratio r = xi_g / xi'_g in 0..1 (0: no absorption, xi'_g = Infinity). */
  readonly absorption?: AbsorptionSetting;
  /** A constant ratio r = xi_g / xi'_g, 0..1: the same as `absorption: r` (give one of the two). */
  readonly absorptionRatio?: number;
  /** Multiply xi_g by cos(thetaB) (Hirsch et al. 1965 definition). Default false: xi_g = 1/(lambda |U_g|). */
  readonly cosThetaFactor?: boolean;
}

export interface ReflectionParameters {
  readonly hkl: Vec3;
  readonly d_nm: number;
  /** |g| = 1/d in nm^-1. */
  readonly g_per_nm: number;
  readonly lambda_nm: number;
  /** Lorentz factor of the beam electrons. */
  readonly gamma: number;
  readonly braggAngle_rad: number;
  /** Electron structure factor F_g in Angstrom (Debye-Waller included, no gamma). */
  readonly F_A: Complex;
  readonly absF_A: number;
  /** U_g = gamma F_g / (pi Vc) in nm^-2. */
  readonly U_per_nm2: Complex;
  /** Extinction distance xi_g in nm. */
  readonly xi_nm: number;
  /** Absorption length xi'_g in nm (Infinity without absorption). */
  readonly xiAbs_nm: number;
  /** Normal absorption length xi'_0 in nm (= xi'_g with a constant ratio). */
  readonly xiAbs0_nm: number;
  /** The absorption setting used ("thermal-diffuse" or the constant ratio). */
  readonly absorption: AbsorptionSetting;
  /** r = xi_g / xi'_g: the constant ratio, or the model's value for this reflection. */
  readonly absorptionRatio: number;
  /** U'_g in nm^-2 (complex; conjugated like U_g). */
  readonly Uabs_per_nm2: Complex;
  /** U'_0 in nm^-2, the normal absorption (= K / xi'_0 without the cos(thetaB) option). */
  readonly Uabs0_per_nm2: number;
  /** Whether xi_g includes the cos(thetaB) factor. */
  readonly cosThetaFactor: boolean;
  readonly cellVolume_nm3: number;
}

export interface OpticalPotential {
  /** Re and Im of U_g in nm^-2. */
  readonly re: number;
  readonly im: number;
  /** Re and Im of the absorptive coefficient U'_g in nm^-2 (r U_g with a constant ratio; for 000 the callers use the normal absorption). */
  readonly absRe: number;
  readonly absIm: number;
}

const volumes = new WeakMap<Material, number>();
function volume_nm3(material: Material): number {
  let v = volumes.get(material);
  if (v === undefined) {
    v = cellVolume_nm3(material.lattice);
    if (!(v > 0) || !Number.isFinite(v)) {
      throw new InputError(`material "${material.name}" has a degenerate cell (volume ${v} nm^3); check its lattice parameters.`);
    }
    volumes.set(material, v);
  }
  return v;
}

function checkAbsorptionRatio(r: number): void {
  if (!Number.isFinite(r) || r < 0 || r > 1) {
    throw new InputError(`absorptionRatio ${r} is out of range; give xi_g/xi'_g between 0 and 1 (0.1 is common practice).`);
  }
}

function checkSetting(a: AbsorptionSetting): void {
  if (typeof a === 'number') checkAbsorptionRatio(a);
  else checkAbsorptionSetting(a);
}

/** The setting of the options: `absorption`, else `absorptionRatio`, else the default model. */
function settingOf(options: ReflectionOptions): AbsorptionSetting {
  if (options.absorption !== undefined && options.absorptionRatio !== undefined && options.absorption !== options.absorptionRatio) {
    throw new Error('reflection options give both absorption and absorptionRatio; give one');
  }
  const a = options.absorption ?? options.absorptionRatio ?? DEFAULT_ABSORPTION;
  checkSetting(a);
  return a;
}

const out4 = new Float64Array(4);
const out2 = new Float64Array(2);

function isSymmetryZero(f: Float64Array): boolean {
  // f[2] = sum of |site terms|: when it underflows to 0 (far beyond the fitted range) nothing can be said by symmetry
  return f[2]! > 0 && Math.hypot(f[0]!, f[1]!) <= FORBIDDEN_RELATIVE_TOLERANCE * f[2]!;
}

/** True when |F_g| vanishes by symmetry for this material's structure (never true for 000). */
export function isForbidden(material: Material, hkl: Vec3): boolean {
  checkMillerIndices(hkl);
  structureFactorInto(out4, material, hkl[0], hkl[1], hkl[2]);
  return isSymmetryZero(out4);
}

/**
 * U_g and U'_g (nm^-2) for any integer hkl, 000 included (U_0 from F_0 at s = 0); exact 0 for a symmetry zero.
 * U'_g = r U_g for a constant ratio r; from the thermal-diffuse model otherwise (for 000 that is the model's U'_0).
 * Phase convention: the waves are exp(+2 pi i k.r) and the potential V(r) = sum_j v(r - r_j) has the Fourier
 * coefficient V_g = (1/Vc) sum_j f_j exp(-2 pi i g.r_j), the complex conjugate of the crystallographic
 * F_g = sum_j f_j exp(+2 pi i g.r_j) that structureFactor_A returns. So U_g = gamma conj(F_g) / (pi Vc); this is
 * the sign for which a displaced crystal V(r - R) gives the phase exp(-2 pi i g.R) used for defects. It matters
 * only for crystals without a centre of symmetry (GaAs, custom structures); F_g is real otherwise.
 */
export function opticalPotential_per_nm2(material: Material, hkl: Vec3, kV: number, absorption: AbsorptionSetting): OpticalPotential {
  checkMillerIndices(hkl);
  checkVoltage_kV(kV);
  checkSetting(absorption);
  structureFactorInto(out4, material, hkl[0], hkl[1], hkl[2]);
  if (isSymmetryZero(out4)) return { re: 0, im: 0, absRe: 0, absIm: 0 };
  // F in nm = F_A / 10
  const k = relativisticGamma(kV) / (Math.PI * volume_nm3(material) * 10);
  const re = k * out4[0]!;
  const im = 0 - k * out4[1]!; // conjugate (see the phase convention above); 0 - 0 keeps +0
  if (typeof absorption === 'number') return { re, im, absRe: absorption * re, absIm: absorption * im };
  const a = thermalDiffuse(material, hkl, kV);
  return { re, im, absRe: a.re, absIm: a.im };
}

/** U'_g (nm^-2) of the thermal-diffuse model, conjugated like U_g. */
function thermalDiffuse(material: Material, hkl: Vec3, kV: number): Complex {
  tdsStructureSumInto(out2, material, hkl[0], hkl[1], hkl[2]);
  const k = tdsPotentialFactor_per_nm2(kV, volume_nm3(material));
  return { re: k * out2[0]!, im: 0 - k * out2[1]! };
}

/**
 * Normal absorption U'_0 (nm^-2) that gives the absorption length xi'_0 in the
 * two-beam equations: 1/xi'_0 = U'_0 / K with K = 1/lambda (0 without absorption).
 */
export function normalAbsorption_per_nm2(lambda_nm: number, xiAbs0_nm: number): number {
  return 1 / lambda_nm / xiAbs0_nm; // K / xi'_0, as the callers wrote it
}

/** Two-beam parameters of reflection hkl at kV kilovolts; InputError for 000 or a forbidden reflection. */
export function reflectionParameters(material: Material, hkl: Vec3, kV: number, options: ReflectionOptions = {}): ReflectionParameters {
  checkMillerIndices(hkl);
  checkVoltage_kV(kV);
  const absorption = settingOf(options);
  const cosThetaFactor = options.cosThetaFactor ?? false;
  const label = `(${hkl[0]} ${hkl[1]} ${hkl[2]})`;
  if (hkl[0] === 0 && hkl[1] === 0 && hkl[2] === 0) {
    throw new InputError(`reflection g = ${label} is the transmitted beam, not a reflection; give a nonzero g.`);
  }
  const g = gLength_per_nm(material.lattice, hkl);
  if (g / 20 > S_MAX_FITTED_perA) {
    throw new InputError(
      `reflection g = ${label} has |g| = ${g.toPrecision(4)} nm^-1, beyond the range of the scattering-factor tables (sin(theta)/lambda <= ${S_MAX_FITTED_perA} per Angstrom, |g| <= ${20 * S_MAX_FITTED_perA} nm^-1); choose a lower-order reflection.`,
    );
  }
  const f = structureFactorInto(new Float64Array(4), material, hkl[0], hkl[1], hkl[2]);
  if (isSymmetryZero(f)) {
    throw new InputError(
      `reflection g = ${label} is forbidden for the ${material.structure} structure of material "${material.name}" (its structure factor vanishes by symmetry, so it has no two-beam extinction distance; it can still appear by double diffraction, which a many-beam set of allowed beams models); choose an allowed reflection.`,
    );
  }
  const Vc = volume_nm3(material);
  const lambda = wavelength_nm(kV);
  const gamma = relativisticGamma(kV);
  const theta = braggAngle_rad(lambda, g);
  const F_A: Complex = { re: f[0]!, im: f[1]! };
  const absF_A = Math.hypot(f[0]!, f[1]!);
  const k = gamma / (Math.PI * Vc * 10);
  const U: Complex = { re: k * F_A.re, im: 0 - k * F_A.im }; // gamma conj(F_g) / (pi Vc): see opticalPotential_per_nm2
  const cosFactor = cosThetaFactor ? Math.cos(theta) : 1;
  const xi = cosFactor / (lambda * k * absF_A);
  let xiAbs: number;
  let xiAbs0: number;
  let Uabs: Complex;
  let Uabs0: number;
  if (typeof absorption === 'number') {
    xiAbs = absorption === 0 ? Infinity : xi / absorption;
    xiAbs0 = xiAbs;
    Uabs = { re: absorption * U.re, im: absorption * U.im };
    Uabs0 = normalAbsorption_per_nm2(lambda, xiAbs0);
  } else {
    Uabs = thermalDiffuse(material, hkl, kV);
    Uabs0 = thermalDiffuse(material, [0, 0, 0], kV).re;
    // the part of U'_g in phase with U_g: the two-beam q = 1/xi_g + i/xi'_g needs it real
    const inPhase = (Uabs.re * U.re + Uabs.im * U.im) / Math.hypot(U.re, U.im);
    if (!(inPhase > 0)) {
      throw new InputError(
        `reflection g = ${label} of material "${material.name}": no two-beam absorption length, since the thermal-diffuse model gives U'_g/U_g = ${(inPhase / Math.hypot(U.re, U.im)).toPrecision(2)} at |g| = ${g.toPrecision(3)} nm^-1 (beyond the scattering-factor fits, or a compound's difference reflection); give a constant absorption ratio such as "absorption": 0.1, or use a many-beam set.`,
      );
    }
    xiAbs = cosFactor / (lambda * inPhase);
    xiAbs0 = Uabs0 > 0 ? cosFactor / (lambda * Uabs0) : Infinity;
  }
  return {
    hkl: [hkl[0], hkl[1], hkl[2]],
    d_nm: 1 / g,
    g_per_nm: g,
    lambda_nm: lambda,
    gamma,
    braggAngle_rad: theta,
    F_A,
    absF_A,
    U_per_nm2: U,
    xi_nm: xi,
    xiAbs_nm: xiAbs,
    xiAbs0_nm: xiAbs0,
    absorption,
    absorptionRatio: typeof absorption === 'number' ? absorption : xi / xiAbs,
    Uabs_per_nm2: Uabs,
    Uabs0_per_nm2: Uabs0,
    cosThetaFactor,
    cellVolume_nm3: Vc,
  };
}
