/**
 * How well one two-beam condition tells the candidates apart, judged on
 * their SIMULATED images: for each candidate the bright-field intensity
 * along a strip of columns across the defect line (the project's renderer,
 * one column evaluator per candidate and condition), as contrast relative to
 * the perfect crystal, c(x) = I(x)/I_background - 1. Two candidates are told
 * apart by a condition when their strips differ somewhere by at least
 * `minDifference` (default 0.2: about twice the 10 % contrast step that is
 * at the limit of what one reads off a micrograph, common practice; the
 * margin covers noise and errors in s and t), ignoring columns within
 * `coreExclusion_nm` of the line, where
 * the column approximation fails.
 *
 * The strip is fixed to the line's position (the line is where the scenario
 * puts it), so a candidate whose image only lies on the other side of the
 * line (b against -b) counts as different: the sign comes from the image
 * side, as in practice, and needs the line position known (e.g. from the
 * other images of the series or from a surface trace).
 */
import type { Vec3 } from '../math/vec3.js';
import { dot, norm } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import type { Candidate } from '../analysis/candidates.js';
import { variantScenario } from '../analysis/candidates.js';
import { defectTypeOf } from '../defects/registry.js';
import type { Condition, Scenario } from '../scenario/types.js';
import { resolveCondition } from '../imaging/resolveCondition.js';
import { background, renderJob } from '../imaging/renderScenario.js';
import { columnEvaluator, type RenderJob } from '../imaging/renderRows.js';
import { modelOf } from '../analysis/visibilityTable.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { InputError } from '../errors.js';
import { coreGeometry } from '../imaging/cores.js';
import type { LoopFieldSpec } from '../imaging/fieldSpecs.js';
import { loopPatch } from '../analysis/lineContrast.js';

export interface StripOptions {
  /** Half-width of the strip in units of xi_g (default 1; a loop's patch has its own size, lineContrast.ts loopPatch). */
  readonly halfWidth_xi: number;
  /** Number of columns in the strip (a loop's patch: PATCH_COLUMNS squared). */
  readonly columns: number;
  readonly minDifference: number;
  readonly coreExclusion_nm: number;
}

export const DEFAULT_STRIP: StripOptions = { halfWidth_xi: 1, columns: 121, minDifference: 0.2, coreExclusion_nm: 2 };

export interface Strip {
  /** Position across the projected line, nm (0 on the line); empty for a loop's patch. */
  readonly x_nm: Float64Array;
  /** Bright-field contrast I/I_background - 1 per candidate (rows): along the strip, or over a loop's patch (row by row). */
  readonly contrast: readonly Float64Array[];
  /** Largest |difference| of contrast between candidates i and j (n x n, row-major). */
  readonly difference: Float64Array;
  /** The line runs (nearly) along the beam: no strip across it. */
  readonly endOn: boolean;
}

/** Bright-field strips of every candidate under one condition and their pairwise differences. */
export function candidateStrips(sc: Scenario, candidates: readonly Candidate[], cond: Condition, opt: StripOptions = DEFAULT_STRIP): Strip {
  const n = candidates.length;
  const target = sc.defects[candidates[0].defectIndex];
  const type = defectTypeOf(target);
  if (target.type === 'loop') return candidatePatches(sc, candidates, cond, opt);
  if (type.line(target) === undefined) {
    throw new InputError(`defects[${candidates[0].defectIndex}] is a "${target.type}"; planning compares images across a dislocation line or over a loop, so choose a dislocation, partial, dissociated dislocation or loop with --defect`);
  }
  const l = sc.material.lattice;
  const P = imagePointToCrystal(referenceFrame(sc), type.position(target));
  const contrast: Float64Array[] = [];
  const x = new Float64Array(opt.columns);
  const out = new Float64Array(4);
  let endOn = false;
  for (let c = 0; c < n; c++) {
    const v = variantScenario(sc, candidates[c]);
    const rc = resolveCondition(v, cond);
    const f = rc.frame;
    const defect = v.defects[candidates[c].defectIndex] as { line: Vec3 };
    const u = directionToCartesian(l, defect.line);
    const dx = dot(u, f.ex), dy = dot(u, f.ey);
    const len = Math.hypot(dx, dy);
    const row = new Float64Array(opt.columns);
    contrast.push(row);
    if (len < 0.05 * norm(u)) {
      endOn = true;
      continue;
    }
    const nx = -dy / len, ny = dx / len;
    const px = dot(P, f.ex), py = dot(P, f.ey);
    const job = renderJob(v, rc);
    const bg = background(job).bf;
    const ev = columnEvaluator(job);
    const H = opt.halfWidth_xi * rc.xi_nm;
    for (let i = 0; i < opt.columns; i++) {
      const s = -H + (2 * H * i) / (opt.columns - 1);
      x[i] = s;
      ev.column(out, px + s * nx, py + s * ny);
      row[i] = (out[0] * out[0] + out[1] * out[1]) / bg - 1;
    }
  }
  const keep = Uint8Array.from(x, (s) => (Math.abs(s) < opt.coreExclusion_nm ? 0 : 1));
  return { x_nm: x, contrast, difference: endOn ? new Float64Array(n * n) : largestDifferences(contrast, keep), endOn };
}

/** Largest |c_i - c_j| over the points with keep = 1, for every pair of candidates (n x n, symmetric, zero diagonal). */
function largestDifferences(contrast: readonly Float64Array[], keep: Uint8Array): Float64Array {
  const n = contrast.length;
  const difference = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      let d = 0;
      for (let q = 0; q < keep.length; q++) {
        if (keep[q] === 0) continue;
        const e = Math.abs(contrast[i][q] - contrast[j][q]);
        if (e > d) d = e;
      }
      difference[i * n + j] = d;
      difference[j * n + i] = d;
    }
  }
  return difference;
}

/** Pairs (i < j) told apart: a bit set as a Uint8Array over the n(n-1)/2 pairs in order (0,1), (0,2), ... */
export function separatedPairs(strip: Strip, n: number, minDifference: number): Uint8Array {
  const out = new Uint8Array((n * (n - 1)) / 2);
  let p = 0;
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) out[p++] = strip.difference[i * n + j] >= minDifference ? 1 : 0;
  return out;
}

/**
 * A loop target: the bright-field contrast of every candidate over the patch of the visibility table
 * (src/analysis/lineContrast.ts loopPatch: the loop's projection plus max(5 nm, xi_g / 4) on each side),
 * compared point by point, leaving out points within `coreExclusion_nm` of the loop's line. The patch is
 * fixed to the loop's position, so b and -b (the two natures of a loop with a prismatic component) count
 * as different when their images differ over it (inside-outside contrast).
 */
function candidatePatches(sc: Scenario, candidates: readonly Candidate[], cond: Condition, opt: StripOptions): Strip {
  const n = candidates.length;
  const k = candidates[0].defectIndex;
  // the patch, the core mask and the background depend on the loop's shape and the condition, not on b
  // (the core radius is 2 |b|: candidates of another |b| differ by far less than the 2 nm margin)
  const first = variantScenario(sc, candidates[0]);
  const rc = resolveCondition(first, cond);
  const alone: RenderJob = { ...renderJob(first, rc), model: modelOf(first, first.defects[k]) };
  const points = loopPatch(rc, alone.model.fields[0] as LoopFieldSpec).points;
  const cores = coreGeometry(alone);
  const keep = new Uint8Array(points.length / 2);
  for (let q = 0; q < keep.length; q++) keep[q] = cores !== null && cores.near(points[2 * q], points[2 * q + 1], opt.coreExclusion_nm) ? 0 : 1;
  const bg = background(alone).bf;
  const contrast: Float64Array[] = [];
  const out = new Float64Array(4);
  for (let c = 0; c < n; c++) {
    const v = c === 0 ? first : variantScenario(sc, candidates[c]);
    const ev = columnEvaluator(renderJob(v, resolveCondition(v, cond)));
    const row = new Float64Array(keep.length);
    for (let q = 0; q < keep.length; q++) {
      if (keep[q] === 0) continue;
      ev.column(out, points[2 * q], points[2 * q + 1]);
      row[q] = (out[0] * out[0] + out[1] * out[1]) / bg - 1;
    }
    contrast.push(row);
  }
  return { x_nm: new Float64Array(0), contrast, difference: largestDifferences(contrast, keep), endOn: false };
}
