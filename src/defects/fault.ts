/** A planar fault crossing the whole foil: an exact phase step alpha = 2 pi g.R where a column crosses the plane. */
import type { Vec3 } from '../math/vec3.js';
import { dot, norm, scale, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import type { Material } from '../crystal/material.js';
import { fail, joinPath, onlyKeys, required, string } from '../scenario/check.js';
import { readPlane, readVector } from '../scenario/parse.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { formatDirectionIn } from '../crystal/formatIndices.js';
import type { DefectType } from './defectType.js';

/** A planar fault crossing the whole foil. */
export interface FaultSpec {
  readonly type: 'fault';
  readonly label: string;
  /** Fault plane (plane indices). */
  readonly plane: Vec3;
  /**
   * Fault vector R_f, lattice units: the displacement of the crystal behind
   * the fault (the side the electrons reach second) relative to the crystal
   * in front of it.
   */
  readonly vector: Vec3;
  /** How the vector was given: "intrinsic", "extrinsic" or "vector". */
  readonly nature: 'intrinsic' | 'extrinsic' | 'vector';
  /** A point on the fault plane (image frame: x, y, depth). */
  readonly point_nm: Vec3;
}

/**
 * Fault vector from the fault nature for an fcc {111} fault: removing a plane
 * (intrinsic) moves the crystal behind the fault towards the front by one
 * plane spacing, inserting one (extrinsic) moves it away: R_f = -/+ (1/3)<111>
 * with <111> the plane normal pointing to the side behind the fault (along the beam).
 */
function natureVector(m: Material, plane: Vec3, nature: 'intrinsic' | 'extrinsic', refBeam: Vec3, path: string): Vec3 {
  const fccBased = ['fcc', 'L1_2', 'diamond', 'zincblende', 'rocksalt', 'custom'].includes(m.structure);
  const is111 = m.lattice.system === 'cubic' && plane.every((h) => Math.abs(Math.abs(h) - Math.abs(plane[0])) < 1e-9 && h !== 0);
  if (!fccBased || !is111) {
    fail(path, `is defined here for {111} faults in fcc-based cubic crystals only (material "${m.name}" is ${m.structure}); give the fault "vector" instead`);
  }
  const n = planeNormalToCartesian(m.lattice, plane);
  const c = dot(n, directionToCartesian(m.lattice, refBeam));
  if (Math.abs(c) < 1e-9 * norm(n)) fail(path, 'cannot be turned into a vector for a fault plane seen edge-on (it contains the beam); give the fault "vector"');
  const h = plane.map((x) => x / Math.abs(plane[0])) as unknown as Vec3; // (+-1 +-1 +-1)
  const k = (Math.sign(c) * (nature === 'intrinsic' ? -1 : 1)) / 3;
  return [h[0] * k, h[1] * k, h[2] * k];
}

export const fault: DefectType<FaultSpec> = {
  type: 'fault',
  positionKey: 'point_nm',
  position: (d) => d.point_nm,
  read(e) {
    const { o, path, material: m } = e;
    const at = e.at;
    onlyKeys(o, ['type', 'label', 'plane', 'vector', 'nature', 'point_nm'], path);
    const plane = readPlane(required(o, 'plane', path, '[1, 1, 1]'), at('plane'), m);
    if (norm(plane) === 0) fail(at('plane'), 'must not be (0 0 0)');
    const point_nm = e.point('point_nm');
    if ((o.vector === undefined) === (o.nature === undefined)) {
      fail(path, 'must give exactly one of "vector" (e.g. "1/3[1 1 1]") and "nature" ("intrinsic" or "extrinsic")');
    }
    if (o.vector !== undefined) {
      const vector = readVector(o.vector, at('vector'), m);
      return { type: 'fault', label: e.label('fault'), plane, vector, nature: 'vector', point_nm };
    }
    const nature = string(o.nature, at('nature'));
    if (nature !== 'intrinsic' && nature !== 'extrinsic') fail(at('nature'), `"${nature}" is not a fault nature; use "intrinsic" or "extrinsic"`);
    return { type: 'fault', label: e.label(`${nature} fault`), plane, vector: natureVector(m, plane, nature, e.beam, at('nature')), nature, point_nm };
  },
  refuseOutsideFoil(d, path, m, t, foilNormal) {
    const z = d.point_nm[2];
    if (!(z < 0 || z > t)) return;
    const n = unit(directionToCartesian(m.lattice, foilNormal));
    const p = unit(planeNormalToCartesian(m.lattice, d.plane));
    if (1 - Math.abs(dot(p, n)) < 1e-9) {
      fail(joinPath(path, 'point_nm'), `the fault plane is parallel to the surfaces at depth ${z} nm, wholly outside the ${t} nm foil; give a depth from 0 to ${t} nm (the foil thickness)`);
    }
  },
  model(d, ctx, out) {
    // normal oriented to the side behind the fault, as seen along the reference beam
    let n = unit(planeNormalToCartesian(ctx.sc.material.lattice, d.plane));
    if (dot(n, ctx.ref.ez) < 0) n = scale(n, -1);
    out.surfaces.push({ kind: 'plane', point_nm: imagePointToCrystal(ctx.ref, d.point_nm), normal: n, jump_nm: ctx.cart(d.vector) });
  },
  warnings(d, ctx) {
    const n = unit(planeNormalToCartesian(ctx.sc.material.lattice, d.plane));
    return Math.abs(dot(n, ctx.ref.ez)) < 1e-6 ? [`${ctx.where}: the fault plane contains the beam (seen edge-on), so it shows no fringes`] : [];
  },
  line: () => undefined,
  visibilityRows: () => [],
  /** The given fault vector and its negative, i.e. intrinsic versus extrinsic for a {111} fault in fcc. */
  candidates(sc, target, defectIndex) {
    const v = target.vector;
    const minus: Vec3 = [-v[0] + 0, -v[1] + 0, -v[2] + 0];
    const text = (r: Vec3) => formatDirectionIn(sc.material.lattice, r);
    const name = (nature: string, r: Vec3) => (nature === 'vector' ? `R = ${text(r)}` : `${nature} (R = ${text(r)})`);
    const other = target.nature === 'intrinsic' ? 'extrinsic' : target.nature === 'extrinsic' ? 'intrinsic' : 'vector';
    return [
      { label: name(target.nature, v), kind: 'faultNature', defectIndex, defect: target, faultVector: v },
      { label: name(other, minus), kind: 'faultNature', defectIndex, defect: { ...target, vector: minus, nature: other }, faultVector: minus },
    ];
  },
  visibilityNote(_lattice, c, cond) {
    if (c.kind !== 'faultNature' || c.faultVector === undefined) return { quantity: '' };
    const gr = Math.round(dot(cond.g, c.faultVector) * 1e9) / 1e9 + 0;
    const frac = gr - Math.floor(gr);
    const invisible = frac < 1e-9 || frac > 1 - 1e-9;
    return {
      quantity: 'g.R',
      value: gr,
      verdict: invisible ? 'invisible' : 'visible',
      rule: invisible ? 'g.R integer: alpha = 2 pi g.R = 0 mod 2 pi' : `alpha = 2 pi g.R = ${Number((((frac * 360 + 180) % 360) - 180).toFixed(1))} degrees (mod 360)`,
    };
  },
};
