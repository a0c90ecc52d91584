/**
 * A dissociated fcc dislocation: two straight Shockley partials (shockleySplit)
 * a ribbon width apart, with the intrinsic stacking fault between them carried
 * by the branch cuts. Both partials get their cut along the ribbon direction
 * u x n: between the partials R jumps by the fault vector b1 (crystal on the
 * +n side relative to the -n side), beyond partial 2 by b1 + b2 = b (a lattice
 * translation, invisible), and nowhere else. No separate fault phase is needed.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import type { DisplacementField } from './field.js';
import { superpose } from './field.js';
import { straightDislocation } from './straightDislocation.js';
import { type ShockleyPair, ribbonPartialPoints, ribbonWidth_nm, shockleySplit } from './dissociation.js';
import { finiteVec3, positive } from './checks.js';

export interface ShockleyRibbonOptions {
  readonly lattice: Lattice;
  /** Perfect Burgers vector, lattice units (a/2<110>). */
  readonly b: Vec3;
  /** Miller indices of the {111} glide plane. */
  readonly planeNormal: Vec3;
  /** Line direction, Cartesian, in the glide plane. */
  readonly lineCartesian: Vec3;
  /** Midpoint between the two partials (nm, Cartesian). */
  readonly centre_nm: Vec3;
  readonly poissonRatio: number;
  readonly shearModulus_GPa: number;
  readonly sfe_mJ_per_m2: number;
  /** Override of the equilibrium width (nm). */
  readonly width_nm?: number;
  /** Core radius of each partial (nm); default |b_partial|. */
  readonly coreRadius_nm?: number;
}

export interface ShockleyRibbon {
  readonly field: DisplacementField;
  readonly pair: ShockleyPair;
  readonly width_nm: number;
  /** Points on partial 1 and partial 2 (nm, Cartesian). */
  readonly partial1_nm: Vec3;
  readonly partial2_nm: Vec3;
}

export function shockleyRibbon(opts: ShockleyRibbonOptions): ShockleyRibbon {
  const pair = shockleySplit(opts);
  const centre = finiteVec3(opts.centre_nm, 'ribbon centre_nm');
  const width =
    opts.width_nm === undefined
      ? ribbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, opts.shearModulus_GPa, opts.poissonRatio, opts.sfe_mJ_per_m2)
      : positive(opts.width_nm, 'ribbon width_nm', 'give the partial separation in nm or omit it for the equilibrium width');
  const [p1, p2] = ribbonPartialPoints(pair, centre, width);
  const common = {
    line: pair.line,
    poissonRatio: opts.poissonRatio,
    cutDirection: pair.ribbonDirection,
    ...(opts.coreRadius_nm === undefined ? {} : { coreRadius_nm: opts.coreRadius_nm }),
  };
  const field = superpose([
    straightDislocation({ ...common, b_nm: pair.b1_nm, point_nm: p1 }),
    straightDislocation({ ...common, b_nm: pair.b2_nm, point_nm: p2 }),
  ]);
  return { field, pair, width_nm: width, partial1_nm: p1, partial2_nm: p2 };
}
