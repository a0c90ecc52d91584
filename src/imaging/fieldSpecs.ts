/**
 * Scenario defects -> a plain, serialisable defect model in the crystal
 * Cartesian frame (nm): the displacement fields to superpose, and the
 * surfaces across which R jumps (fault planes and the cuts of dislocations),
 * which the integrator crosses with an exact phase step (alpha form).
 * Plain data so that worker threads can rebuild the same model.
 */
import { type Vec3, unit } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import type { Scenario } from '../scenario/types.js';
import { referenceFrame } from './scenarioFrame.js';
import type { DisplacementField } from '../elasticity/field.js';
import { superpose } from '../elasticity/field.js';
import { straightDislocation } from '../elasticity/straightDislocation.js';
import { sphericalInclusion } from '../elasticity/inclusion.js';
import { inclusionInsideFoil, inclusionSurfaceCorrection } from '../elasticity/inclusionSurface.js';
import { loopField } from '../elasticity/loopField.js';
import { anisotropicDislocation } from '../elasticity/anisotropicDislocation.js';
import { materialStiffness } from '../elasticity/stiffness.js';
import { surfaceCorrection, surfaceCorrectionFor, type SurfaceCorrectionSpec } from '../elasticity/surfaceRelaxation.js';
import type { ModelContext, ModelParts } from '../defects/defectType.js';
import { defectTypeOf } from '../defects/registry.js';

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
  /**
   * Present when the foil surfaces are relaxed and a correction exists for this
   * line (parallel or normal to the surfaces, with a screw component): the
   * surface correction (elasticity/surfaceRelaxation.ts) is added to the field.
   */
  readonly surfaceCorrection?: SurfaceCorrectionSpec;
}

export interface InclusionFieldSpec {
  readonly kind: 'inclusion';
  readonly centre_nm: Vec3;
  readonly radius_nm: number;
  readonly strain: number;
  readonly poissonRatio: number;
  /**
   * Present when the foil surfaces are relaxed and the sphere lies wholly inside the foil: the
   * Mindlin & Cheng half-space correction of each surface (elasticity/inclusionSurface.ts) is added.
   */
  readonly surfaceCorrection?: { readonly normal: Vec3; readonly thickness_nm: number };
}

/** A closed plane polygon loop, isotropic infinite medium (elasticity/loopField.ts). */
export interface LoopFieldSpec {
  readonly kind: 'loop';
  readonly b_nm: Vec3;
  /** Vertices (Cartesian nm, flat x y z ...), counterclockwise about the loop normal. */
  readonly vertices_nm: readonly number[];
  readonly poissonRatio: number;
  readonly coreRadius_nm?: number;
}

export type FieldSpec = DislocationFieldSpec | InclusionFieldSpec | LoopFieldSpec;

/**
 * A surface across which the displacement jumps. For a column crossing from
 * the side opposite to `normal` to the side `normal` points to, R changes by
 * `jump_nm` (R behind minus R in front).
 */
export interface JumpSurface {
  readonly kind: 'plane' | 'half-plane' | 'polygon';
  readonly point_nm: Vec3;
  /** Unit normal of the plane. */
  readonly normal: Vec3;
  readonly jump_nm: Vec3;
  /** Half-plane only: the bounding line direction (unit) and the in-plane direction (unit) into the half-plane. */
  readonly edge?: Vec3;
  readonly into?: Vec3;
  /** Polygon only: its vertices in the plane (Cartesian nm, flat x y z ...). */
  readonly vertices_nm?: readonly number[];
}

export interface DefectModel {
  readonly fields: readonly FieldSpec[];
  readonly surfaces: readonly JumpSurface[];
}

/** The fields and jump surfaces of all defects, in scenario order; each defect type adds its own (src/defects/). */
export function defectModel(sc: Scenario): DefectModel {
  const m = sc.material;
  const ctx: ModelContext = {
    sc,
    ref: referenceFrame(sc),
    poissonRatio: m.elastic.poissonRatio,
    stiffness_GPa: elasticStiffness(sc),
    cart: (d: Vec3) => directionToCartesian(m.lattice, d),
  };
  const out: ModelParts = { fields: [], surfaces: [] };
  for (const d of sc.defects) defectTypeOf(d).model(d, ctx, out);
  const fields = sc.surfaces === 'relaxed' ? out.fields.map((f) => withSurfaceCorrection(f, ctx.ref.normal, sc.thickness_nm)) : out.fields;
  return { fields, surfaces: out.surfaces };
}

/** A dislocation's or an inclusion's spec with its surface correction, when one applies (the foil is 0 <= r.n <= t). */
function withSurfaceCorrection(f: FieldSpec, normal: Vec3, thickness_nm: number): FieldSpec {
  if (f.kind === 'inclusion') return inclusionInsideFoil(f.centre_nm, f.radius_nm, normal, thickness_nm) ? { ...f, surfaceCorrection: { normal: unit(normal), thickness_nm } } : f;
  if (f.kind !== 'dislocation') return f;
  const c = surfaceCorrectionFor(f.b_nm, f.line, f.point_nm, normal, thickness_nm, f.stiffness_GPa);
  return c === null ? f : { ...f, surfaceCorrection: c };
}

/** The Voigt stiffness the dislocation fields of a scenario use, or undefined for isotropic elasticity. */
export function elasticStiffness(sc: Scenario): number[] | undefined {
  return sc.elasticity === 'anisotropic' ? materialStiffness(sc.material) : undefined;
}

/** The combined displacement field, or null when no defect has a field. */
export function buildField(specs: readonly FieldSpec[]): DisplacementField | null {
  if (specs.length === 0) return null;
  const fields = specs.flatMap((s) => {
    if (s.kind === 'loop') return [loopField(s)];
    if (s.kind !== 'dislocation') {
      const sphere = sphericalInclusion({ centre_nm: s.centre_nm, radius_nm: s.radius_nm, strain: s.strain, poissonRatio: s.poissonRatio });
      if (s.surfaceCorrection === undefined) return [sphere];
      const c = s.surfaceCorrection;
      return [sphere, inclusionSurfaceCorrection({ centre_nm: s.centre_nm, strength_nm3: s.strain * s.radius_nm ** 3, normal: c.normal, thickness_nm: c.thickness_nm, poissonRatio: s.poissonRatio })];
    }
    const line = s.stiffness_GPa === undefined ? straightDislocation(s) : anisotropicDislocation({ ...s, stiffness_GPa: s.stiffness_GPa });
    return s.surfaceCorrection === undefined ? [line] : [line, surfaceCorrection({ b_nm: s.b_nm, line: s.line, point_nm: s.point_nm, correction: s.surfaceCorrection, stiffness_GPa: s.stiffness_GPa, poissonRatio: s.poissonRatio })];
  });
  return fields.length === 1 ? fields[0] : superpose(fields);
}

