/**
 * Scenario defects -> a plain, serialisable defect model in the crystal
 * Cartesian frame (nm): the displacement fields to superpose, and the
 * surfaces across which R jumps (fault planes and the cuts of dislocations),
 * which the integrator crosses with an exact phase step (alpha form).
 * Plain data so that worker threads can rebuild the same model.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, scale, sub, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import type { Material } from '../crystal/material.js';
import type { DefectSpec, Elasticity, Scenario } from '../scenario/types.js';
import { imagePointToCrystal, type ImageFrame } from '../geometry/frames.js';
import { referenceFrame } from './scenarioFrame.js';
import type { DisplacementField } from '../elasticity/field.js';
import { superpose } from '../elasticity/field.js';
import { straightDislocation, dislocationFrame } from '../elasticity/straightDislocation.js';
import { sphericalInclusion } from '../elasticity/inclusion.js';
import { anisotropicRibbonWidth_nm, ribbonPartialPoints, ribbonWidth_nm, shockleySplit, type ShockleyPair } from '../elasticity/dissociation.js';
import { anisotropicDislocation } from '../elasticity/anisotropicDislocation.js';
import { materialStiffness } from '../elasticity/stiffness.js';
import { InputError } from '../errors.js';

export interface DislocationFieldSpec {
  readonly kind: 'dislocation';
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  readonly poissonRatio: number;
  readonly coreRadius_nm?: number;
  readonly cutDirection: Vec3;
  /**
   * Present for anisotropic elasticity: the 6 x 6 Voigt stiffness (36 numbers,
   * GPa, crystal Cartesian frame); the field is then the Stroh solution
   * (elasticity/anisotropicDislocation.ts), otherwise the isotropic one with
   * `poissonRatio`.
   */
  readonly stiffness_GPa?: readonly number[];
}

export interface InclusionFieldSpec {
  readonly kind: 'inclusion';
  readonly centre_nm: Vec3;
  readonly radius_nm: number;
  readonly strain: number;
  readonly poissonRatio: number;
}

export type FieldSpec = DislocationFieldSpec | InclusionFieldSpec;

/**
 * A surface across which the displacement jumps. For a column crossing from
 * the side opposite to `normal` to the side `normal` points to, R changes by
 * `jump_nm` (R behind minus R in front).
 */
export interface JumpSurface {
  readonly kind: 'plane' | 'half-plane';
  readonly point_nm: Vec3;
  /** Unit normal of the plane. */
  readonly normal: Vec3;
  readonly jump_nm: Vec3;
  /** Half-plane only: the bounding line direction (unit) and the in-plane direction (unit) into the half-plane. */
  readonly edge?: Vec3;
  readonly into?: Vec3;
}

export interface DefectModel {
  readonly fields: readonly FieldSpec[];
  readonly surfaces: readonly JumpSurface[];
}

/** A dislocation with an explicit cut: its field and the half-plane where R jumps by b. */
function dislocationWithCut(
  b_nm: Vec3,
  line: Vec3,
  point_nm: Vec3,
  nu: number,
  stiffness: readonly number[] | undefined,
  cut: Vec3 | undefined,
  core?: number,
): { field: DislocationFieldSpec; surface: JumpSurface } {
  const u = unit(line);
  const c = cut === undefined ? scale(dislocationFrame(b_nm, u).e1, -1) : unit(sub(cut, scale(u, dot(cut, u))));
  const field: DislocationFieldSpec = {
    kind: 'dislocation',
    b_nm,
    line: u,
    point_nm,
    poissonRatio: nu,
    cutDirection: c,
    ...(core === undefined ? {} : { coreRadius_nm: core }),
    ...(stiffness === undefined ? {} : { stiffness_GPa: stiffness }),
  };
  // Crossing the cut towards +(u x c), R drops by b (FS/RH; see elasticity/straightDislocation.ts).
  const surface: JumpSurface = { kind: 'half-plane', point_nm, normal: unit(cross(u, c)), jump_nm: scale(b_nm, -1), edge: u, into: c };
  return { field, surface };
}

export function defectModel(sc: Scenario): DefectModel {
  const m = sc.material;
  const l = m.lattice;
  const ref = referenceFrame(sc);
  const nu = m.elastic.poissonRatio;
  const C = elasticStiffness(sc);
  const fields: FieldSpec[] = [];
  const surfaces: JumpSurface[] = [];
  const cart = (d: Vec3) => directionToCartesian(l, d);
  const add1 = (x: { field: DislocationFieldSpec; surface: JumpSurface }) => {
    fields.push(x.field);
    surfaces.push(x.surface);
  };
  for (const d of sc.defects) {
    switch (d.type) {
      case 'dislocation':
        add1(dislocationWithCut(cart(d.b), cart(d.line), imagePointToCrystal(ref, d.point_nm), nu, C, undefined, d.core_nm));
        break;
      case 'partial': {
        const n = unit(planeNormalToCartesian(l, d.faultPlane));
        const side = cart(d.faultSide);
        const inPlane = sub(side, scale(n, dot(side, n)));
        add1(dislocationWithCut(cart(d.b), cart(d.line), imagePointToCrystal(ref, d.point_nm), nu, C, inPlane, d.core_nm));
        break;
      }
      case 'dissociated':
        for (const p of dissociatedPartials(m, d, ref, sc.elasticity)) add1(p);
        break;
      case 'fault': {
        // normal oriented to the side behind the fault, as seen along the reference beam
        let n = unit(planeNormalToCartesian(l, d.plane));
        if (dot(n, ref.ez) < 0) n = scale(n, -1);
        surfaces.push({ kind: 'plane', point_nm: imagePointToCrystal(ref, d.point_nm), normal: n, jump_nm: cart(d.vector) });
        break;
      }
      case 'inclusion':
        fields.push({ kind: 'inclusion', centre_nm: imagePointToCrystal(ref, d.centre_nm), radius_nm: d.radius_nm, strain: d.strain, poissonRatio: nu });
        break;
    }
  }
  return { fields, surfaces };
}

type DissociatedDefect = Extract<DefectSpec, { type: 'dissociated' }>;

/** The two Shockley partials (in the order that makes the fault between them intrinsic) of a dissociated defect. */
export function dissociationPair(m: Material, d: DissociatedDefect): ShockleyPair {
  const l = m.lattice;
  try {
    return shockleySplit({ lattice: l, b: d.b, planeNormal: d.plane, lineCartesian: directionToCartesian(l, d.line) });
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${d.label}: ${e.message}`);
    throw e;
  }
}

/** The Voigt stiffness the dislocation fields of a scenario use, or undefined for isotropic elasticity. */
export function elasticStiffness(sc: Scenario): number[] | undefined {
  return sc.elasticity === 'anisotropic' ? materialStiffness(sc.material) : undefined;
}

/**
 * Width of the ribbon a dissociated defect gets (nm): as given, or the
 * equilibrium width from the stacking-fault energy, with the anisotropic
 * energy factors (Hirth & Lothe ch. 13) or the isotropic formula (ch. 10).
 */
export function dissociationWidth_nm(m: Material, d: DissociatedDefect, pair: ShockleyPair = dissociationPair(m, d), elasticity: Elasticity = 'anisotropic'): number {
  if (d.separation_nm !== undefined) return d.separation_nm;
  const gamma = m.stackingFaultEnergy_mJ_per_m2 as number;
  return elasticity === 'anisotropic'
    ? anisotropicRibbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, materialStiffness(m), gamma)
    : ribbonWidth_nm(pair.b1_nm, pair.b2_nm, pair.line, m.elastic.shearModulus_GPa, m.elastic.poissonRatio, gamma);
}

/** The two Shockley partials of a dissociated dislocation, each with its cut along the ribbon (intrinsic fault between them). */
function dissociatedPartials(m: Material, d: DissociatedDefect, ref: ImageFrame, elasticity: Elasticity) {
  const pair = dissociationPair(m, d);
  const width = dissociationWidth_nm(m, d, pair, elasticity);
  const centre = imagePointToCrystal(ref, d.point_nm);
  const [p1, p2] = ribbonPartialPoints(pair, centre, width);
  const nu = m.elastic.poissonRatio;
  const C = elasticity === 'anisotropic' ? materialStiffness(m) : undefined;
  return [
    dislocationWithCut(pair.b1_nm, pair.line, p1, nu, C, pair.ribbonDirection, d.core_nm),
    dislocationWithCut(pair.b2_nm, pair.line, p2, nu, C, pair.ribbonDirection, d.core_nm),
  ];
}

/** The combined displacement field, or null when no defect has a field. */
export function buildField(specs: readonly FieldSpec[]): DisplacementField | null {
  if (specs.length === 0) return null;
  const fields = specs.map((s) =>
    s.kind === 'dislocation'
      ? s.stiffness_GPa === undefined
        ? straightDislocation(s)
        : anisotropicDislocation({ ...s, stiffness_GPa: s.stiffness_GPa })
      : sphericalInclusion({ centre_nm: s.centre_nm, radius_nm: s.radius_nm, strain: s.strain, poissonRatio: s.poissonRatio }),
  );
  return fields.length === 1 ? fields[0] : superpose(fields);
}

