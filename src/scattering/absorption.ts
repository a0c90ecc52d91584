/**
 * Absorption per reflection from thermal diffuse scattering (TDS), Einstein
 * model: Hall & Hirsch 1965 (Proc. R. Soc. A286, 158), Bird & King 1990
 * (Acta Cryst. A46, 202), Weickenmeier & Kohl 1991 (Acta Cryst. A47, 590).
 *
 * Model. Every atom vibrates on its own (no correlation between atoms, no
 * phonon dispersion) with the mean-square displacement of its Debye-Waller
 * factor B = 8 pi^2 <u^2> (A^2; amplitude factor exp(-B s^2) = <exp(-2 pi i g.u)>).
 * Electrons scattered out of the Bragg beams by the thermal motion are lost
 * to them; second-order perturbation theory gives the imaginary (absorptive)
 * part of the optical potential, per atom
 *
 *   f'(g) = 2 (h / m0 v) I(g),      h / m0 v = gamma lambda     (Angstrom)
 *   I(g)  = int d^2s' fe(|s'|) fe(|S - s'|) [exp(-B S^2) - exp(-B (s'^2 + |S - s'|^2))]
 *
 * S = g/2 (|S| = s = sin(theta)/lambda, A^-1), s' runs over the plane
 * perpendicular to the beam (small-angle form), fe the electron scattering
 * factor of the neutral atom (A, non-relativistic); I is dimensionless.
 * The bracket is <e^{-2 pi i (q + g - q).u}> - <e^{-2 pi i q.u}><e^{-2 pi i (g - q).u}>,
 * the thermal fluctuation part; it vanishes for B = 0 (no TDS without
 * thermal motion). The absorptive potential coefficients follow exactly as
 * the elastic ones (reflection.ts):
 *
 *   U'_g = gamma F'_g / (pi Vc),   F'_g = sum_j occ_j f'_j(g) exp(2 pi i g.r_j)   (conjugated like U_g)
 *        = 2 gamma^2 lambda sum_j occ_j I_j(g) exp(...) / (pi Vc)   (nm^-2, lambda in nm, Vc in nm^3)
 *
 * so U'_g / U_g scales as gamma lambda = h / (m0 v): it falls with voltage.
 * In an elemental crystal U'_g / U_g grows with |g|; for the difference
 * reflections of a compound (MgO 111, GaAs 200, superlattice reflections) the
 * ratio follows the difference of the species' f' and f and need not.
 * Check of the prefactor (optical theorem, any scattering text): for g = 0,
 * 2 pi U'_0 / K = mu_0 = N sigma_TDS with sigma_TDS = int |gamma fe|^2 (1 - exp(-2 B s^2)) dOmega,
 * N atoms per volume, K = 1/lambda; the tests check this by a separate quadrature.
 *
 * Evaluation. With the 5-Gaussian fit fe(s) = sum_i a_i exp(-b_i s^2)
 * (Peng, Ren, Dudarev & Whelan 1996; scatteringFactor.ts) every term of I is
 * a product of Gaussians whose plane integral is closed,
 *   int exp(-a |x|^2 - b |S - x|^2) d^2x = pi / (a + b) exp(-a b S^2 / (a + b)),
 * so
 *   I = sum_ij a_i a_j pi [ exp(-B S^2) exp(-b_i b_j S^2 / (b_i + b_j)) / (b_i + b_j)
 *                         - exp(-(b_i + B)(b_j + B) S^2 / (b_i + b_j + 2B)) / (b_i + b_j + 2B) ],
 * 15 distinct pairs, exact for the fit. scripts/ref_absorptive_form_factor.py
 * integrates the same model numerically (test/reference/absorptive-form-factors.json).
 *
 * What the fit leaves out. The Gaussian fits are made for s <= 2 A^-1 and
 * fall off faster than the true fe (which tends to 0.023934 (Z - fx) / s^2,
 * Mott-Bethe) beyond it, while the TDS integral weights high angles by
 * (1 - exp(-2 B s'^2)). Measured with the reference script
 * (test/reference/absorptive-form-factors.json): with the fit, the part of
 * I(0) from s' > 2 A^-1 is 4 % (Al), 7 % (Cu), 6 % (Si), 9 % (Au); continuing
 * fe beyond 2 A^-1 as C / s^2 (continuous at 2 A^-1, a lower bound on the true
 * tail) raises I by 6-9 % at s = 0, 8-11 % at s = 0.4 A^-1, 12-15 % at
 * s = 0.7 A^-1 and about 20 % at s = 1 A^-1. So U'_0 and the U'_g of
 * low-order beams from the fit are low by roughly 10 %, and more for high
 * orders; f'(s) of the fit even changes sign near s = 1.5-1.9 A^-1 (with
 * B = 0.5 A^2; earlier for a large B: Mg, B = 1.6 A^2, near 1.2 A^-1), beams
 * that carry negligible weight in diffraction contrast; reflectionParameters
 * refuses such a reflection as a two-beam g (InputError) and many-beam sets
 * take the small negative coefficients as they are.
 * This is comparable to the uncertainty of the Debye-Waller factors
 * themselves (materials data: 10-20 %). Not in the model at all: absorption
 * by core-loss and plasmon (valence) inelastic scattering (small-angle
 * scattering that mostly stays in the aperture; it adds mainly to the normal
 * absorption U'_0), correlated phonons (Einstein model only), an objective
 * aperture (all TDS counts as lost), and any anisotropy of the thermal motion.
 */
import type { Material } from '../crystal/material.js';
import { InputError } from '../errors.js';
import type { ElectronCoefficients } from './scatteringFactor.js';
import { electronCoefficients } from './scatteringFactor.js';
import { packed } from './structureFactor.js';
import { relativisticGamma, wavelength_nm } from './wavelength.js';

import { type AbsorptionSetting, THERMAL_DIFFUSE } from './absorptionSetting.js';

export { type AbsorptionSetting, THERMAL_DIFFUSE } from './absorptionSetting.js';

/** The default everywhere (scenario, CLI, library): the TDS model. */
export const DEFAULT_ABSORPTION: AbsorptionSetting = THERMAL_DIFFUSE;

/** One line naming the absorption used, for render.json, reports and the CLI. */
export function describeAbsorption(a: AbsorptionSetting): string {
  return typeof a === 'number'
    ? `constant ratio xi_g/xi'_g = ${a} for every beam, U'_0 from xi'_0 = xi'_g of the imaging reflection (Hirsch et al. 1965, common practice)`
    : "thermal diffuse scattering, Einstein model (Hall & Hirsch 1965; Bird & King 1990; Weickenmeier & Kohl 1991): U'_g per beam and U'_0 from the sites' Debye-Waller factors";
}

/** InputError unless `a` is a ratio in 0..1 or "thermal-diffuse"; `field` names the input. */
export function checkAbsorptionSetting(a: unknown, field = 'absorption'): asserts a is AbsorptionSetting {
  if (a === THERMAL_DIFFUSE) return;
  if (typeof a === 'number' && Number.isFinite(a) && a >= 0 && a <= 1) return;
  throw new InputError(
    `${field} ${JSON.stringify(a)} is not valid; give "${THERMAL_DIFFUSE}" (absorption from thermal diffuse scattering, the default) or a constant ratio xi_g/xi'_g between 0 and 1 (0.1 is common practice).`,
  );
}

/**
 * Closed-form coefficients of I(S) for one element and one B:
 *   I = exp(-B S^2) sum_p A1_p exp(-c1_p S^2) - sum_p A2_p exp(-c2_p S^2),  p over the 15 pairs i <= j.
 */
export interface TdsKernel {
  readonly B_A2: number;
  readonly A1: Float64Array;
  readonly c1: Float64Array;
  readonly A2: Float64Array;
  readonly c2: Float64Array;
}

export function tdsKernel(c: ElectronCoefficients, B_A2: number): TdsKernel {
  if (!Number.isFinite(B_A2) || B_A2 < 0) throw new InputError(`Debye-Waller factor ${B_A2} of ${c.symbol}: give a value >= 0 in Angstrom^2.`);
  const n = c.a.length;
  const m = (n * (n + 1)) / 2;
  const A1 = new Float64Array(m);
  const c1 = new Float64Array(m);
  const A2 = new Float64Array(m);
  const c2 = new Float64Array(m);
  let p = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const w = (i === j ? 1 : 2) * Math.PI * c.a[i]! * c.a[j]!;
      const bi = c.b[i]!;
      const bj = c.b[j]!;
      const s1 = bi + bj;
      const s2 = s1 + 2 * B_A2;
      A1[p] = w / s1;
      c1[p] = (bi * bj) / s1;
      A2[p] = w / s2;
      c2[p] = ((bi + B_A2) * (bj + B_A2)) / s2;
      p++;
    }
  }
  return { B_A2, A1, c1, A2, c2 };
}

/** I(S) (dimensionless) at S^2 = s^2 in A^-2 from a kernel. */
export function tdsIntegralFromKernel(k: TdsKernel, s2_perA2: number): number {
  let t1 = 0;
  let t2 = 0;
  const n = k.A1.length;
  for (let p = 0; p < n; p++) {
    t1 += k.A1[p]! * Math.exp(-k.c1[p]! * s2_perA2);
    t2 += k.A2[p]! * Math.exp(-k.c2[p]! * s2_perA2);
  }
  return Math.exp(-k.B_A2 * s2_perA2) * t1 - t2;
}

/** I(s) of an element with Debye-Waller factor B (A^2) at s = |g|/2 (A^-1); dimensionless. */
export function tdsIntegral(element: string, B_A2: number, s_perA: number): number {
  return tdsIntegralFromKernel(tdsKernel(electronCoefficients(element), B_A2), s_perA * s_perA);
}

/** Absorptive form factor f'(s) = 2 gamma lambda I(s) in Angstrom at kV kilovolts (no gamma of its own, like fe). */
export function absorptiveFormFactor_A(element: string, B_A2: number, s_perA: number, kV: number): number {
  return 2 * relativisticGamma(kV) * wavelength_nm(kV) * 10 * tdsIntegral(element, B_A2, s_perA);
}

interface AbsorptivePack {
  /** one kernel per distinct (element, B) */
  readonly kernels: readonly TdsKernel[];
  /** kernel index of each site */
  readonly kind: Int32Array;
  /** scratch: I of each kernel at the current s */
  readonly I: Float64Array;
}

const packs = new WeakMap<Material, AbsorptivePack>();

function absorptivePack(material: Material): AbsorptivePack {
  let ap = packs.get(material);
  if (ap) return ap;
  const p = packed(material);
  const kernels: TdsKernel[] = [];
  const index = new Map<string, number>();
  const kind = new Int32Array(p.n);
  for (let j = 0; j < p.n; j++) {
    const el = p.elements[p.kind[j]!]!;
    const B = p.B_A2[j]!;
    const key = `${el.Z}:${B}`;
    let k = index.get(key);
    if (k === undefined) {
      k = kernels.length;
      index.set(key, k);
      kernels.push(tdsKernel(el, B));
    }
    kind[j] = k;
  }
  ap = { kernels, kind, I: new Float64Array(kernels.length) };
  packs.set(material, ap);
  return ap;
}

/**
 * Writes into `out` (length >= 2) the dimensionless structure sum
 *   T_g = sum_j occ_j I_j(g) exp(2 pi i g.r_j)        (out[0] = Re, out[1] = Im),
 * each site with its own element and B; F'_g = 2 gamma lambda T_g (A). No allocation.
 */
export function tdsStructureSumInto(out: Float64Array, material: Material, h: number, k: number, l: number): Float64Array {
  const p = packed(material);
  const ap = absorptivePack(material);
  const gm = p.gm;
  const g2_per_nm2 = h * h * gm[0]! + k * k * gm[1]! + l * l * gm[2]! + 2 * (h * k * gm[3]! + h * l * gm[4]! + k * l * gm[5]!);
  const s2 = g2_per_nm2 / 400; // s = |g|/2, |g| in A^-1 = |g|_nm / 10
  const I = ap.I;
  for (let e = 0; e < ap.kernels.length; e++) I[e] = tdsIntegralFromKernel(ap.kernels[e]!, s2);
  let re = 0;
  let im = 0;
  for (let j = 0; j < p.n; j++) {
    const f = p.occ[j]! * I[ap.kind[j]!]!;
    const phase = 2 * Math.PI * (h * p.x[j]! + k * p.y[j]! + l * p.z[j]!);
    re += f * Math.cos(phase);
    im += f * Math.sin(phase);
  }
  out[0] = re;
  out[1] = im;
  return out;
}

/**
 * Factor that turns T_g into U'_g (nm^-2): U'_g = 2 gamma^2 lambda conj(T_g) / (pi Vc),
 * lambda in nm, Vc in nm^3 (same conjugation as U_g, see reflection.ts).
 */
export function tdsPotentialFactor_per_nm2(kV: number, cellVolume_nm3: number): number {
  const gamma = relativisticGamma(kV);
  return (2 * gamma * gamma * wavelength_nm(kV)) / (Math.PI * cellVolume_nm3);
}
