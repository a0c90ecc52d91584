/**
 * Scenario defects -> plain, serialisable field specifications in the crystal
 * Cartesian frame (nm), and the displacement fields built from them. Plain
 * data so that worker threads can rebuild the same fields.
 */
import type { Vec3 } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import type { Scenario } from '../scenario/types.js';
import { imageFrame, imagePointToCrystal, type ImageFrame } from '../geometry/frames.js';
import type { DisplacementField } from '../elasticity/field.js';
import { superpose } from '../elasticity/field.js';
import { straightDislocation } from '../elasticity/straightDislocation.js';

export interface DislocationFieldSpec {
  readonly kind: 'dislocation';
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  readonly poissonRatio: number;
  readonly coreRadius_nm?: number;
  readonly cutDirection?: Vec3;
}

export type FieldSpec = DislocationFieldSpec;

/** The frame in which defect points are given: the scenario's own beam. */
export function referenceFrame(sc: Scenario): ImageFrame {
  const l = sc.material.lattice;
  return imageFrame(directionToCartesian(l, sc.beam), sc.imageX_cart, directionToCartesian(l, sc.foilNormal), sc.thickness_nm);
}

export function fieldSpecs(sc: Scenario): FieldSpec[] {
  const l = sc.material.lattice;
  const ref = referenceFrame(sc);
  const nu = sc.material.elastic.poissonRatio;
  return sc.defects.map((d): FieldSpec => {
    const spec: DislocationFieldSpec = {
      kind: 'dislocation',
      b_nm: directionToCartesian(l, d.b),
      line: directionToCartesian(l, d.line),
      point_nm: imagePointToCrystal(ref, d.point_nm),
      poissonRatio: nu,
    };
    return d.core_nm === undefined ? spec : { ...spec, coreRadius_nm: d.core_nm };
  });
}

/** The combined displacement field, or null for a perfect crystal. */
export function buildField(specs: readonly FieldSpec[]): DisplacementField | null {
  if (specs.length === 0) return null;
  const fields = specs.map((s) => straightDislocation(s));
  return fields.length === 1 ? fields[0] : superpose(fields);
}
