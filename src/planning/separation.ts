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
import { columnEvaluator } from '../imaging/renderRows.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { InputError } from '../errors.js';

export interface StripOptions {
  /** Half-width of the strip in units of xi_g (default 1). */
  readonly halfWidth_xi: number;
  /** Number of columns in the strip. */
  readonly columns: number;
  readonly minDifference: number;
  readonly coreExclusion_nm: number;
}

export const DEFAULT_STRIP: StripOptions = { halfWidth_xi: 1, columns: 121, minDifference: 0.2, coreExclusion_nm: 2 };

export interface Strip {
  /** Position across the projected line, nm (0 on the line). */
  readonly x_nm: Float64Array;
  /** Bright-field contrast I/I_background - 1 per candidate (rows). */
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
  if (type.line(target) === undefined) {
    throw new InputError(`defects[${candidates[0].defectIndex}] is a "${target.type}"; planning compares images across a dislocation line, so choose a dislocation, partial or dissociated dislocation with --defect`);
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
  const difference = new Float64Array(n * n);
  if (!endOn) {
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        let d = 0;
        for (let k = 0; k < opt.columns; k++) {
          if (Math.abs(x[k]) < opt.coreExclusion_nm) continue;
          const e = Math.abs(contrast[i][k] - contrast[j][k]);
          if (e > d) d = e;
        }
        difference[i * n + j] = d;
        difference[j * n + i] = d;
      }
    }
  }
  return { x_nm: x, contrast, difference, endOn };
}

/** Pairs (i < j) told apart: a bit set as a Uint8Array over the n(n-1)/2 pairs in order (0,1), (0,2), ... */
export function separatedPairs(strip: Strip, n: number, minDifference: number): Uint8Array {
  const out = new Uint8Array((n * (n - 1)) / 2);
  let p = 0;
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) out[p++] = strip.difference[i * n + j] >= minDifference ? 1 : 0;
  return out;
}
