/**
 * The stacking-fault energy implied by a measured ribbon width: the inverse
 * of the equilibrium widths of dissociation.ts. Both widths are
 * d = A / gamma with A independent of gamma (Hirth & Lothe 1982, ch. 10
 * isotropic, ch. 13 anisotropic: the repulsion per unit length A / d of two
 * parallel partials balances gamma), so gamma = A / d with A the width at
 * gamma = 1 mJ/m^2.
 */
import type { Vec3 } from '../math/vec3.js';
import { anisotropicRibbonWidth_nm, ribbonWidth_nm } from './dissociation.js';
import { positive } from './checks.js';

/** Isotropic: gamma (mJ/m^2) from the partial separation width_nm (nm) in the glide plane. */
export function isotropicSfeFromWidth_mJ_per_m2(b1_nm: Vec3, b2_nm: Vec3, u: Vec3, shearModulus_GPa: number, poissonRatio: number, width_nm: number): number {
  const w = positive(width_nm, 'ribbon width_nm', 'give the partial separation in nm');
  return ribbonWidth_nm(b1_nm, b2_nm, u, shearModulus_GPa, poissonRatio, 1) / w;
}

/** Anisotropic (energy-factor matrix of the line direction, Stroh): gamma (mJ/m^2) from the partial separation. */
export function anisotropicSfeFromWidth_mJ_per_m2(b1_nm: Vec3, b2_nm: Vec3, u: Vec3, stiffness_GPa: readonly number[], width_nm: number): number {
  const w = positive(width_nm, 'ribbon width_nm', 'give the partial separation in nm');
  return anisotropicRibbonWidth_nm(b1_nm, b2_nm, u, stiffness_GPa, 1) / w;
}
