/**
 * What the straight-line defect types (dislocation, partial, dissociated)
 * share: a dislocation with an explicit cut, the refusal of a line wholly
 * outside the foil, the warnings about a line seen end-on or outside the
 * field of view, Burgers-vector candidates and their g.b notes.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm, scale, sub, unit } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import type { Lattice } from '../crystal/lattice.js';
import type { Material } from '../crystal/material.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { dislocationFrame } from '../elasticity/straightDislocation.js';
import { InputError } from '../errors.js';
import { sig } from '../format.js';
import { fail, joinPath } from '../scenario/check.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';
import type { DislocationFieldSpec, JumpSurface } from '../imaging/fieldSpecs.js';
import { type Candidate, type VisibilityNote } from '../analysis/candidates.js';
import { judge } from '../analysis/visibility.js';
import type { RowMaker, WarningContext } from './defectType.js';
import type { DislocationSpec } from './dislocation.js';
import type { PartialSpec } from './partial.js';
import { modelOf, only } from '../analysis/visibilityTable.js';
import { formatDirectionIn, indicesWithFraction } from '../crystal/formatIndices.js';

/** A dislocation with an explicit cut: its field and the half-plane where R jumps by b. */
export function dislocationWithCut(
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

/** A straight line through point_nm (image frame) along `line` (lattice units). */
interface LineLike {
  readonly line: Vec3;
  readonly point_nm: Vec3;
}

/** Refuses a line parallel to the surfaces at a depth outside the foil (a line that crosses the foil somewhere is accepted). */
export function refuseLineOutsideFoil(d: LineLike, path: string, m: Material, t: number, foilNormal: Vec3): void {
  const z = d.point_nm[2];
  if (!(z < 0 || z > t)) return;
  const n = unit(directionToCartesian(m.lattice, foilNormal));
  if (Math.abs(dot(unit(directionToCartesian(m.lattice, d.line)), n)) < 1e-9) {
    fail(joinPath(path, 'point_nm'), `the line is parallel to the surfaces at depth ${z} nm, wholly outside the ${t} nm foil; give a depth from 0 to ${t} nm (the foil thickness)`);
  }
}

/**
 * The part of the segment a + f (b - a), f in [0, 1], inside the rectangle
 * |x| <= hw, |y| <= hh (Liang-Barsky clipping); null when it misses.
 */
function clipToRectangle(ax: number, ay: number, bx: number, by: number, hw: number, hh: number): [number, number] | null {
  let f0 = 0;
  let f1 = 1;
  const dx = bx - ax;
  const dy = by - ay;
  const edges: [number, number][] = [[-dx, ax + hw], [dx, hw - ax], [-dy, ay + hh], [dy, hh - ay]];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return null;
    } else {
      const r = q / p;
      if (p < 0) f0 = Math.max(f0, r);
      else f1 = Math.min(f1, r);
    }
  }
  return f0 <= f1 ? [f0, f1] : null;
}

/** A line seen end-on, a point outside the foil, the line outside the field of view. */
export function lineWarnings(d: LineLike, ctx: WarningContext): string[] {
  const out: string[] = [];
  const { ref, where } = ctx;
  const t = ctx.sc.thickness_nm;
  const hw = ctx.halfWidth_nm;
  const hh = ctx.halfHeight_nm;
  const u = unit(directionToCartesian(ctx.sc.material.lattice, d.line));
  if (norm(cross(u, ref.ez)) < 1e-6) out.push(`${where}: the line runs along the beam (seen end-on): the image shows only its strain field around a point`);
  // the part of the line inside the foil (the parser refuses a line parallel to the surfaces outside it)
  const p: Vec3 = imagePointToCrystal(ref, d.point_nm);
  const un = dot(u, ref.normal);
  const z = d.point_nm[2];
  let a: Vec3 = p;
  let b: Vec3 = p;
  if (Math.abs(un) > 1e-9) {
    // depth along the line: z + lambda (u . n); the foil is 0 <= depth <= t
    const l0 = -z / un;
    const l1 = (t - z) / un;
    a = [p[0] + l0 * u[0], p[1] + l0 * u[1], p[2] + l0 * u[2]];
    b = [p[0] + l1 * u[0], p[1] + l1 * u[1], p[2] + l1 * u[2]];
    if (z < 0 || z > t) {
      out.push(`${where}: point_nm is at depth ${z} nm, outside the ${t} nm foil; the line is drawn where it crosses the foil, from (${sig(dot(a, ref.ex), 3)}, ${sig(dot(a, ref.ey), 3)}) to (${sig(dot(b, ref.ex), 3)}, ${sig(dot(b, ref.ey), 3)}) nm in the image`);
    }
    // nearly parallel to the surfaces: relaxed, it gets the corrections of an inclined line about where it meets
    // the surfaces, which free little beyond a fraction of a thickness from there (README, Foil surfaces)
    const near = Math.min(Math.abs(l0), Math.abs(l1));
    if (ctx.sc.surfaces === 'relaxed' && z >= 0 && z <= t && near > 3 * t) {
      const deg = (Math.asin(Math.min(1, Math.abs(un))) * 180) / Math.PI;
      out.push(`${where}: the line runs ${sig(deg, 2)} degrees from the foil surfaces and meets them ${sig(near / t, 2)} foil thicknesses from point_nm: with relaxed surfaces it gets the half-space corrections of where it meets them, which relax little this far away; a line exactly parallel to the surfaces (line . normal = 0) gets the exact plate correction (README, Foil surfaces)`);
    }
  } else {
    // parallel to the surfaces: the line is infinite in the image
    const big = 1e7;
    a = [p[0] - big * u[0], p[1] - big * u[1], p[2] - big * u[2]];
    b = [p[0] + big * u[0], p[1] + big * u[1], p[2] + big * u[2]];
  }
  if (clipToRectangle(dot(a, ref.ex), dot(a, ref.ey), dot(b, ref.ex), dot(b, ref.ey), hw, hh) === null) {
    out.push(`${where}: the part of the line inside the foil lies outside the ${sig(2 * hw, 4)} x ${sig(2 * hh, 4)} nm field of view, so the image shows at most the tail of its strain field; move point_nm or enlarge the image`);
  }
  return out;
}

/**
 * Every Burgers vector of the scenario's "candidates" list with BOTH signs
 * (b and -b are different hypotheses: the image moves to the other side of
 * the core, Hirsch et al. 1965), in list order, repeats left out. With
 * `targetLine` (straight-line defects) each comes with its line: the entry's
 * own (ownLine) or the target's, and a repeat is the same b with the same line;
 * without it (loops) lines play no part. `example`: the list the message for an
 * empty "candidates" suggests.
 */
export function signedBurgers(sc: Scenario, example: string, targetLine?: Vec3): { readonly b: Vec3; readonly line?: Vec3; readonly ownLine: boolean }[] {
  if (sc.candidates.length === 0) {
    throw new InputError(`candidates is empty; list the Burgers vectors to compare, e.g. "candidates": [${example}]`);
  }
  const out: { b: Vec3; line?: Vec3; ownLine: boolean }[] = [];
  const seen = new Set<string>();
  for (const spec of sc.candidates) {
    for (const sign of [1, -1]) {
      const b: Vec3 = [sign * spec.b[0] + 0, sign * spec.b[1] + 0, sign * spec.b[2] + 0];
      const line = targetLine === undefined ? undefined : spec.line ?? targetLine;
      const key = line === undefined ? indicesWithFraction(b) : `${indicesWithFraction(b)} ${indicesWithFraction(line)}`;
      if (seen.has(key)) continue;
      seen.add(key);
      out.push({ b, ...(line === undefined ? {} : { line }), ownLine: targetLine !== undefined && spec.line !== undefined });
    }
  }
  return out;
}

/** The Burgers-vector candidates of a straight-line defect (signedBurgers), those failing `keep` left out. */
export function burgersCandidates(sc: Scenario, defectIndex: number, keep: (b: Vec3) => boolean): Candidate[] {
  const target = sc.defects[defectIndex];
  if (!('b' in target) || !('line' in target)) throw new RangeError('burgersCandidates: target has no Burgers vector');
  const l = sc.material.lattice;
  const out: Candidate[] = [];
  for (const { b, line, ownLine } of signedBurgers(sc, '"1/2<110>"', target.line)) {
    if (!keep(b) || line === undefined) continue;
    // hexagonal crystals: four indices (1/3[1 1 -2 0]); cubic: the usual 1/2[1 1 0]
    const bText = formatDirectionIn(l, b);
    const label = ownLine ? `b = ${bText}, u = ${formatDirectionIn(l, line)}` : `b = ${bText}`;
    out.push({ label, kind: 'burgers', defectIndex, defect: { ...target, b, line } as DefectSpec, b, line });
  }
  if (out.length === 0) {
    throw new InputError(`candidates holds no Burgers vector that fits defects[${defectIndex}] (a dissociated dislocation needs b in its glide plane); add suitable candidates`);
  }
  return out;
}

/** The g.b / g.(b x u) entry of a Burgers-vector candidate. */
export function burgersNote(lattice: Lattice, c: Candidate, cond: Condition): VisibilityNote {
  if (c.kind === 'burgers' && c.b !== undefined) {
    const j = judge(lattice, cond.g, c.b, c.line);
    return { quantity: 'g.b', value: j.gb, ...(j.gbxu === undefined ? {} : { gbxu: j.gbxu }), verdict: j.verdict, rule: j.rule };
  }
  return { quantity: '' };
}

/**
 * What a single straight line (a perfect dislocation, a partial) has in common
 * besides reading and its cut: its point, the foil check, its warnings, one
 * visibility row, and the Burgers vectors of the candidates list (both signs).
 */
export const singleLineParts = {
  positionKey: 'point_nm',
  position: (d: DislocationSpec | PartialSpec): Vec3 => d.point_nm,
  refuseOutsideFoil: refuseLineOutsideFoil,
  warnings: lineWarnings,
  line: (d: DislocationSpec | PartialSpec): Vec3 => d.line,
  visibilityRows: (sc: Scenario, d: DislocationSpec | PartialSpec, row: RowMaker) => [row(d.label, d.b, d.line, () => only(modelOf(sc, d), 0))],
  candidates: (sc: Scenario, _d: DislocationSpec | PartialSpec, i: number): Candidate[] => burgersCandidates(sc, i, () => true),
  visibilityNote: burgersNote,
};
