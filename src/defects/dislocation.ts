/** A straight perfect dislocation: Burgers vector, line direction and a point on the line. */
import type { Vec3 } from '../math/vec3.js';
import { onlyKeys, required } from '../scenario/check.js';
import { readDirection } from '../scenario/parse.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import type { DefectType } from './defectType.js';
import { dislocationWithCut, singleLineParts } from './lineDefect.js';

export interface DislocationSpec {
  readonly type: 'dislocation';
  readonly label: string;
  /** Burgers vector, lattice units. */
  readonly b: Vec3;
  /** Line direction u, lattice units. */
  readonly line: Vec3;
  /** A point on the line: x, y from the image centre in the reference image frame, z depth below the entrance surface (nm). */
  readonly point_nm: Vec3;
  /** Core radius used to regularise the field (nm). */
  readonly core_nm?: number;
}

export const dislocation: DefectType<DislocationSpec> = {
  type: 'dislocation',
  read(e) {
    const { o, path, material: m } = e;
    onlyKeys(o, ['type', 'label', 'b', 'line', 'point_nm', 'core_nm'], path);
    const b = e.burgers('1/2[1 1 0]');
    const line = readDirection(required(o, 'line', path, '[1, -1, 0]'), e.at('line'), m);
    return { type: 'dislocation', label: e.label('dislocation'), b, line, point_nm: e.point('point_nm'), ...e.core() };
  },
  model(d, ctx, out) {
    const x = dislocationWithCut(ctx.cart(d.b), ctx.cart(d.line), imagePointToCrystal(ctx.ref, d.point_nm), ctx.poissonRatio, ctx.stiffness_GPa, undefined, d.core_nm);
    out.fields.push(x.field);
    out.surfaces.push(x.surface);
  },
  ...singleLineParts,
};
