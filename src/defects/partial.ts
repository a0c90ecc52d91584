/** A partial dislocation bounding a fault that runs from its line to the foil surfaces (the cut lies in the fault plane). */
import type { Vec3 } from '../math/vec3.js';
import { add, dot, norm, scale, sub, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { fail, onlyKeys, required } from '../scenario/check.js';
import { readDirection, readPlane } from '../scenario/parse.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import type { DefectType } from './defectType.js';
import { dislocationWithCut, singleLineParts } from './lineDefect.js';

/** A partial dislocation bounding a fault that runs from its line to the foil surfaces. */
export interface PartialSpec {
  readonly type: 'partial';
  readonly label: string;
  readonly b: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  /** Plane of the fault the partial bounds. */
  readonly faultPlane: Vec3;
  /** Crystal direction (projected into the fault plane, perpendicular to the line) from the line into the fault. */
  readonly faultSide: Vec3;
  readonly core_nm?: number;
}

export const partial: DefectType<PartialSpec> = {
  type: 'partial',
  read(e) {
    const { o, path, material: m } = e;
    const at = e.at;
    onlyKeys(o, ['type', 'label', 'b', 'line', 'point_nm', 'faultPlane', 'faultSide', 'core_nm'], path);
    const b = e.burgers('1/6[1 1 -2]');
    const line = readDirection(required(o, 'line', path, '[1, -1, 0]'), at('line'), m);
    const faultPlane = readPlane(required(o, 'faultPlane', path, '[1, 1, 1]'), at('faultPlane'), m);
    const faultSide = readDirection(required(o, 'faultSide', path, '[1, 1, -2]'), at('faultSide'), m);
    const n = unit(planeNormalToCartesian(m.lattice, faultPlane));
    const u = unit(directionToCartesian(m.lattice, line));
    if (Math.abs(dot(n, u)) > 0.02) fail(at('line'), 'must lie in the fault plane (perpendicular to the plane normal)');
    const side = directionToCartesian(m.lattice, faultSide);
    const inPlane = sub(side, add(scale(n, dot(side, n)), scale(u, dot(side, u))));
    if (norm(inPlane) < 1e-6 * norm(side)) fail(at('faultSide'), 'must point from the line into the fault, within the fault plane and not along the line');
    return { type: 'partial', label: e.label('partial'), b, line, point_nm: e.point('point_nm'), faultPlane, faultSide, ...e.core() };
  },
  model(d, ctx, out) {
    const n = unit(planeNormalToCartesian(ctx.sc.material.lattice, d.faultPlane));
    const side = ctx.cart(d.faultSide);
    const inPlane = sub(side, scale(n, dot(side, n)));
    const x = dislocationWithCut(ctx.cart(d.b), ctx.cart(d.line), imagePointToCrystal(ctx.ref, d.point_nm), ctx.poissonRatio, ctx.stiffness_GPa, inPlane, d.core_nm);
    out.fields.push(x.field);
    out.surfaces.push(x.surface);
  },
  ...singleLineParts,
};
