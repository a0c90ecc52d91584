/**
 * A closed planar dislocation loop (prismatic, shear or mixed; perfect or
 * faulted): habit-plane normal, centre, Burgers vector and a circle or a
 * polygon in the habit plane. Its field is Burgers' formula in an isotropic
 * infinite medium (src/elasticity/loopField.ts); its jump surface is the loop's
 * own plane polygon, where R jumps by b (an exact phase step 2 pi g.b).
 *
 * Frame in the habit plane. n = the unit normal of `normal`; e1 = unit(beam x n)
 * with the scenario's beam (the in-plane direction perpendicular to the beam,
 * seen at true length in the image); when the plane is normal to the beam,
 * e1 = the crystal Cartesian axis least parallel to n, made normal to n;
 * e2 = n x e1. `vertices_nm` are [a1, a2] pairs on e1, e2 relative to the
 * centre. The line direction runs counterclockwise about n (the given vertex
 * order is reversed when it runs clockwise), so that with b FS/RH about that
 * direction b.n > 0 is a vacancy loop and b.n < 0 an interstitial loop
 * (loopField.ts: crossing the plane along +n, R drops by b).
 *
 * Fault bookkeeping. Crossing the loop's polygon the displacement jumps by b
 * (Volterra): this IS the enclosed fault, so the loop adds one jump surface and
 * never a second fault plane. A `fault` only names and checks it: its fault
 * vector, the displacement of the crystal on the -n side relative to the +n
 * side, must equal b up to a lattice translation (then exp(2 pi i g.b) is the
 * fault's phase for every g). "intrinsic" and "extrinsic" stand for
 * +1/3 and -1/3 of the {111} plane normal (fcc-based crystals): an intrinsic
 * Frank loop is a vacancy loop, an extrinsic one an interstitial loop.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm, scale, unit } from '../math/vec3.js';
import { directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import type { Material } from '../crystal/material.js';
import { array, fail, joinPath, number, onlyKeys, required, string } from '../scenario/check.js';
import { readPlane, readVector } from '../scenario/parse.js';
import { formatDirectionIn, indicesWithFraction } from '../crystal/formatIndices.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { circleSides, circleVertices } from '../elasticity/loopField.js';
import { sig } from '../format.js';
import type { DefectType } from './defectType.js';
import type { Candidate } from '../analysis/candidates.js';
import { burgersNote, signedBurgers } from './lineDefect.js';
import { modelOf } from '../analysis/visibilityTable.js';
import type { LoopFieldSpec } from '../imaging/fieldSpecs.js';

export interface LoopSpec {
  readonly type: 'loop';
  readonly label: string;
  /** Burgers vector (lattice units), FS/RH about the line direction (counterclockwise about the normal). */
  readonly b: Vec3;
  /** Habit-plane normal (plane indices). */
  readonly normal: Vec3;
  /** Centre (image frame: x, y, depth). */
  readonly centre_nm: Vec3;
  /** A circle of this radius ... */
  readonly radius_nm?: number;
  /** ... or a polygon: [a1, a2] on the in-plane frame (e1, e2), counterclockwise about n. */
  readonly vertices_nm?: readonly (readonly [number, number])[];
  /** The enclosed fault, when named: its nature and vector (equal to b up to a lattice translation). */
  readonly fault?: { readonly nature: 'intrinsic' | 'extrinsic' | 'vector'; readonly vector: Vec3 };
  readonly core_nm?: number;
  /** In-plane frame and unit normal, crystal Cartesian. */
  readonly frame: { readonly e1: Vec3; readonly e2: Vec3; readonly n: Vec3 };
}

const MAX_VERTICES = 180;

/** In-plane frame of a habit plane (see the file comment). */
export function loopFrame(m: Material, normal: Vec3, beam: Vec3): { e1: Vec3; e2: Vec3; n: Vec3 } {
  const n = unit(planeNormalToCartesian(m.lattice, normal));
  let e = cross(unit(directionToCartesian(m.lattice, beam)), n);
  if (norm(e) < 1e-6) {
    const a = n.map(Math.abs);
    const axis: Vec3 = a[0] <= a[1] && a[0] <= a[2] ? [1, 0, 0] : a[1] <= a[2] ? [0, 1, 0] : [0, 0, 1];
    e = cross(n, cross(axis, n));
  }
  const e1 = unit(e);
  return { e1, e2: cross(n, e1), n };
}

/** True when v (lattice units) maps every atom site onto a site of the same element: a lattice translation. */
export function isLatticeTranslation(m: Material, v: Vec3): boolean {
  const near = (x: number) => Math.abs(x - Math.round(x)) < 1e-6;
  return m.sites.every((s) =>
    m.sites.some(
      (t) => t.element === s.element && near(s.position[0] + v[0] - t.position[0]) && near(s.position[1] + v[1] - t.position[1]) && near(s.position[2] + v[2] - t.position[2]),
    ),
  );
}

/** Offsets of the loop's vertices from its centre (crystal Cartesian nm), counterclockwise about n. */
export function loopOffsets(d: LoopSpec, pixel_nm: number): number[] {
  const { e1, e2 } = d.frame;
  if (d.radius_nm !== undefined) return circleVertices([0, 0, 0], e1, e2, d.radius_nm, circleSides(d.radius_nm, pixel_nm));
  const out: number[] = [];
  for (const [a, b] of d.vertices_nm ?? []) out.push(a * e1[0] + b * e2[0], a * e1[1] + b * e2[1], a * e1[2] + b * e2[2]);
  return out;
}

function signedArea(p: readonly (readonly [number, number])[]): number {
  let s = 0;
  for (let i = 0; i < p.length; i++) {
    const [x1, y1] = p[i];
    const [x2, y2] = p[(i + 1) % p.length];
    s += x1 * y2 - x2 * y1;
  }
  return s / 2;
}

/** True when the open segments p1-p2 and p3-p4 cross. */
function segmentsCross(p1: readonly number[], p2: readonly number[], p3: readonly number[], p4: readonly number[]): boolean {
  const o = (a: readonly number[], b: readonly number[], c: readonly number[]) => (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
  const d1 = o(p3, p4, p1), d2 = o(p3, p4, p2), d3 = o(p1, p2, p3), d4 = o(p1, p2, p4);
  return d1 * d2 < 0 && d3 * d4 < 0;
}

function readVertices(v: unknown, path: string): [number, number][] {
  const a = array(v, path, 3);
  if (a.length > MAX_VERTICES) fail(path, `has ${a.length} vertices; give at most ${MAX_VERTICES}`);
  const p = a.map((x, i) => {
    const q = array(x, joinPath(path, i));
    if (q.length !== 2) fail(joinPath(path, i), 'must be [a1, a2] in nm: the vertex on the two in-plane axes, relative to the centre');
    return [number(q[0], joinPath(joinPath(path, i), 0), { min: -1000, max: 1000, unit: 'nm' }), number(q[1], joinPath(joinPath(path, i), 1), { min: -1000, max: 1000, unit: 'nm' })] as [number, number];
  });
  for (let i = 0; i < p.length; i++) {
    const j = (i + 1) % p.length;
    if (Math.hypot(p[j][0] - p[i][0], p[j][1] - p[i][1]) < 1e-6) fail(joinPath(path, j), 'repeats the vertex before it; remove one of the two');
  }
  for (let i = 0; i < p.length; i++) {
    for (let j = i + 1; j < p.length; j++) {
      if (segmentsCross(p[i], p[(i + 1) % p.length], p[j], p[(j + 1) % p.length])) fail(path, `edges ${i} and ${j} cross; give the vertices in order round a simple polygon`);
    }
  }
  const area = signedArea(p);
  if (Math.abs(area) < 1e-6) fail(path, 'encloses no area; give at least three vertices not on one line');
  return area > 0 ? p : p.slice().reverse();
}

function readFault(v: unknown, path: string, m: Material, b: Vec3, normal: Vec3): LoopSpec['fault'] {
  let nature: 'intrinsic' | 'extrinsic' | 'vector' = 'vector';
  let vector: Vec3;
  if (typeof v === 'string' && (v === 'intrinsic' || v === 'extrinsic')) {
    nature = v;
    const fccBased = ['fcc', 'L1_2', 'diamond', 'zincblende', 'rocksalt', 'custom'].includes(m.structure);
    const is111 = m.lattice.system === 'cubic' && normal.every((h) => h !== 0 && Math.abs(Math.abs(h) - Math.abs(normal[0])) < 1e-9);
    if (!fccBased || !is111) fail(path, `"${v}" is defined for loops on {111} in fcc-based cubic crystals only; give the fault vector instead, e.g. "1/3[1 1 1]"`);
    const h = normal.map((x) => x / Math.abs(normal[0]));
    const k = (v === 'intrinsic' ? 1 : -1) / 3;
    vector = [h[0] * k, h[1] * k, h[2] * k];
  } else {
    if (typeof v === 'string' && !/[[\d]/.test(v)) fail(path, `"${v}" is not a fault; use "intrinsic", "extrinsic" or a fault vector such as "1/3[1 1 1]"`);
    if (typeof v !== 'string' && !Array.isArray(v)) fail(path, `${JSON.stringify(v)} is not a fault; use "intrinsic", "extrinsic" or a fault vector such as "1/3[1 1 1]"`);
    vector = readVector(v, path, m);
  }
  const diff: Vec3 = [b[0] - vector[0], b[1] - vector[1], b[2] - vector[2]];
  if (!isLatticeTranslation(m, diff)) {
    fail(
      path,
      `names the fault vector ${indicesWithFraction(vector)}, but a loop's enclosed fault is its Burgers vector b = ${indicesWithFraction(b)} up to a lattice translation (for a Frank loop on (${normal.join(' ')}) an intrinsic fault needs b = +1/3 of the normal, a vacancy loop, and an extrinsic one -1/3); change "b" or "fault"`,
    );
  }
  return { nature, vector };
}

export type LoopNature = 'vacancy' | 'interstitial' | 'shear';

/**
 * Nature of a loop from b and its unit normal n, both crystal Cartesian (loopField.ts: the line runs
 * counterclockwise about n, so b.n > 0 is a vacancy loop and b.n < 0 an interstitial loop); "shear"
 * when b lies in the loop plane (|b.n| < 1e-6 |b|).
 */
export function natureOfBurgers(b_cart: Vec3, n: Vec3): LoopNature {
  const bn = dot(b_cart, n);
  if (Math.abs(bn) < 1e-6 * norm(b_cart)) return 'shear';
  return bn > 0 ? 'vacancy' : 'interstitial';
}

/** Nature of a loop as given (its b and habit-plane normal). */
export function loopNature(m: Material, d: LoopSpec): LoopNature {
  return natureOfBurgers(directionToCartesian(m.lattice, d.b), d.frame.n);
}

export const loop: DefectType<LoopSpec> = {
  type: 'loop',
  positionKey: 'centre_nm',
  position: (d) => d.centre_nm,
  read(e) {
    const { o, path, material: m } = e;
    const at = e.at;
    onlyKeys(o, ['type', 'label', 'b', 'normal', 'centre_nm', 'radius_nm', 'vertices_nm', 'fault', 'core_nm'], path);
    const b = e.burgers('1/3[1 1 1]');
    const normal = readPlane(required(o, 'normal', path, '[1, 1, 1]'), at('normal'), m);
    if (norm(normal) === 0) fail(at('normal'), 'must not be (0 0 0); give the habit-plane normal, e.g. [1, 1, 1]');
    const centre_nm = e.requiredPoint('centre_nm', '[0, 0, 50]');
    if ((o.radius_nm === undefined) === (o.vertices_nm === undefined)) {
      fail(path, 'must give exactly one of "radius_nm" (a circular loop) and "vertices_nm" (a polygon in the habit plane)');
    }
    const frame = loopFrame(m, normal, e.beam);
    const shape =
      o.radius_nm !== undefined
        ? { radius_nm: number(o.radius_nm, at('radius_nm'), { min: 0.5, max: 1000, unit: 'nm' }) }
        : { vertices_nm: readVertices(o.vertices_nm, at('vertices_nm')) };
    const fault = o.fault === undefined ? undefined : readFault(o.fault, at('fault'), m, b, normal);
    const kind = fault !== undefined ? `${fault.nature === 'vector' ? 'faulted' : fault.nature} loop` : 'loop';
    return { type: 'loop', label: e.label(kind), b, normal, centre_nm, ...shape, ...(fault === undefined ? {} : { fault }), ...e.core(), frame };
  },
  refuseOutsideFoil(d, path, m, t, foilNormal) {
    const f = unit(directionToCartesian(m.lattice, foilNormal));
    const off = loopOffsets(d, 0.01);
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < off.length; i += 3) {
      const z = off[i] * f[0] + off[i + 1] * f[1] + off[i + 2] * f[2];
      lo = Math.min(lo, z);
      hi = Math.max(hi, z);
    }
    const z0 = d.centre_nm[2];
    if (z0 + lo < 0 || z0 + hi > t) {
      fail(
        joinPath(path, 'centre_nm'),
        `the loop reaches from depth ${sig(z0 + lo, 4)} to ${sig(z0 + hi, 4)} nm, so a surface of the ${t} nm foil cuts it; thinfoil models loops wholly inside the foil only: move its centre deeper or make it smaller`,
      );
    }
  },
  model(d, ctx, out) {
    const c = imagePointToCrystal(ctx.ref, d.centre_nm);
    const off = loopOffsets(d, ctx.sc.image.pixel_nm);
    const vertices_nm = off.map((x, i) => x + c[i % 3]);
    const b_nm = ctx.cart(d.b);
    out.fields.push({ kind: 'loop', b_nm, vertices_nm, poissonRatio: ctx.poissonRatio, ...(d.core_nm === undefined ? {} : { coreRadius_nm: d.core_nm }) });
    // crossing the polygon along +n, R drops by b (loopField.ts): the jump is -b
    out.surfaces.push({ kind: 'polygon', point_nm: c, normal: d.frame.n, jump_nm: scale(b_nm, -1), vertices_nm });
  },
  warnings(d, ctx) {
    const w: string[] = [];
    const [x, y] = d.centre_nm;
    const off = loopOffsets(d, ctx.sc.image.pixel_nm);
    let reach = 0;
    for (let i = 0; i < off.length; i += 3) {
      reach = Math.max(reach, Math.abs(dot([off[i], off[i + 1], off[i + 2]], ctx.ref.ex)), Math.abs(dot([off[i], off[i + 1], off[i + 2]], ctx.ref.ey)));
    }
    if (Math.abs(x) - reach > ctx.halfWidth_nm || Math.abs(y) - reach > ctx.halfHeight_nm) {
      w.push(`${ctx.where}: the loop (x ${x} nm, y ${y} nm) lies outside the ${sig(2 * ctx.halfWidth_nm, 4)} x ${sig(2 * ctx.halfHeight_nm, 4)} nm field of view; only the tail of its strain field reaches the image`);
    }
    if (Math.abs(dot(d.frame.n, ctx.ref.ez)) < 0.02) {
      w.push(`${ctx.where}: the loop plane contains the beam (seen edge-on), so the loop shows as a line and an enclosed fault shows no fringes`);
    }
    const pixel = ctx.sc.image.pixel_nm;
    if (2 * reach < 2 * pixel) w.push(`${ctx.where}: the loop (${sig(2 * reach, 3)} nm across in the image) is smaller than two pixels of ${pixel} nm; its image is only its strain field`);
    if (d.fault === undefined && !isLatticeTranslation(ctx.sc.material, d.b)) {
      w.push(`${ctx.where}: b = ${indicesWithFraction(d.b)} is not a lattice translation, so the loop encloses a fault with fault vector b (name it with "fault")`);
    }
    return w;
  },
  line: () => undefined,
  /** One row: the loop's b, its g.b rule and the simulated contrast of a patch of columns over the loop (lineContrast.ts loopContrast). */
  visibilityRows: (sc, d, row) => [
    row(d.label, d.b, undefined, () => {
      const model = modelOf(sc, d);
      return { model, loop: model.fields[0] as LoopFieldSpec };
    }),
  ],
  /**
   * Every Burgers vector of the scenario's "candidates" list with both signs, on the target's habit plane,
   * centre and shape: with the normal fixed, b and -b are the two natures (vacancy, interstitial) of a loop
   * with a prismatic component. A candidate names no fault: its jump b across the loop is the enclosed fault.
   */
  candidates(sc, target, defectIndex) {
    const { fault: _fault, ...rest } = target;
    return signedBurgers(sc, '"1/3<111>", "1/2<110>"').map(({ b }): Candidate => {
      const defect: LoopSpec = { ...rest, b };
      return { label: `b = ${formatDirectionIn(sc.material.lattice, b)} (${loopNature(sc.material, defect)})`, kind: 'burgers', defectIndex, defect, b };
    });
  },
  visibilityNote: burgersNote,
};
