/**
 * The material record every stage reads: lattice, atom sites with
 * Debye-Waller factors, elastic constants and (where the trade uses it) the
 * stacking-fault energy. Library entries live in data/materials.json with the
 * source of every number; a scenario may define its own material inline with
 * the same fields.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Lattice } from './lattice.js';

export interface Site {
  /** Element symbol, e.g. "Cu". */
  readonly element: string;
  /** Fractional coordinates in the cell. */
  readonly position: Vec3;
  /** Site occupancy, 0..1. */
  readonly occupancy: number;
  /** Debye-Waller factor B = 8 pi^2 <u^2> in Angstrom^2. */
  readonly debyeWaller_A2: number;
}

/** Elastic stiffness constants in GPa, Voigt notation; only those the symmetry needs. */
export interface ElasticConstants {
  readonly C11: number;
  readonly C12: number;
  readonly C44: number;
  readonly C13?: number;
  readonly C33?: number;
  readonly C66?: number;
}

export interface Elasticity {
  readonly cij_GPa: ElasticConstants;
  /** Isotropic shear modulus (GPa) from the named average of the Cij. */
  readonly shearModulus_GPa: number;
  /** Isotropic Poisson ratio from the same average. */
  readonly poissonRatio: number;
  /** Name of the average used, e.g. "Voigt-Reuss-Hill". */
  readonly average: string;
}

export interface Material {
  readonly name: string;
  /** Plain description, e.g. "aluminium, fcc". */
  readonly description: string;
  /** Structure label: fcc, bcc, diamond, zincblende, hcp, B2, L1_2, rocksalt, or custom. */
  readonly structure: string;
  readonly lattice: Lattice;
  readonly sites: readonly Site[];
  readonly elastic: Elasticity;
  /** Intrinsic stacking-fault energy in mJ/m^2, where the trade uses it. */
  readonly stackingFaultEnergy_mJ_per_m2?: number;
  /** Source of each group of numbers (lattice, debyeWaller, elastic, stackingFault). */
  readonly sources: Readonly<Record<string, string>>;
}
