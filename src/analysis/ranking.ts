/**
 * Scoring and ranking of candidates against micrographs, and the verdict.
 *
 * Score. For every condition i the micrograph's relative contrast c_i and the
 * registered simulation's relative contrast s_i (both with their
 * least-squares background plane removed) are compared through the fraction
 * of the micrograph's contrast variance that the simulation explains,
 *     R2_i = 1 - |c_i - a_i s_i|^2 / |c_i|^2 ,
 * with a_i >= 0 the contrast scale (blur, inelastic background and detector
 * lower the simulated contrast). The candidate's score is the mean of R2_i
 * over the conditions. The scales are tied together: one scale a for all
 * micrographs whose pixel values are proportional to intensity, each a_i
 * allowed to differ from a by at most a factor `spread` (default 1.5). This
 * tie is what lets invisibility count: a candidate that predicts strong
 * contrast where a micrograph shows none cannot scale that prediction away,
 * and R2_i turns negative. Micrographs with an unknown grey mapping
 * ("display") get a free a_i >= 0; there R2_i = max(0, NCC)^2 and
 * invisibility is not evidence.
 *
 * Verdict. The noise of the score comes from re-scoring the candidates on
 * bootstrap copies of the micrographs: the best candidate's fitted image
 * plus its residual, resampled in blocks so that the noise keeps its
 * spatial correlation (moving-block bootstrap, Kuensch 1989, in two
 * dimensions), with the registration shift re-optimised each time. The gap
 * between the best candidate and another is significant when it exceeds
 * `sigmas` (default 3) standard deviations of the bootstrap gap and also a
 * floor of 0.002 in score (below that the registration's own precision
 * decides). The best candidate is "identified" when every other candidate's
 * gap is significant, and otherwise the verdict is "cannot tell" between it
 * and the candidates it does not exclude.
 */

import { sig } from '../format.js';

/** Dot products of one micrograph (c) with one registered simulation window (s). */
export interface PairStats {
  readonly cs: number;
  readonly ss: number;
  readonly cc: number;
}

export function pairStats(c: Float64Array, s: Float64Array): PairStats {
  let cs = 0;
  let ss = 0;
  let cc = 0;
  for (let k = 0; k < c.length; k++) {
    cs += c[k] * s[k];
    ss += s[k] * s[k];
    cc += c[k] * c[k];
  }
  return { cs, ss, cc };
}

export interface AmplitudeFit {
  /** Mean of R2 over the conditions. */
  readonly score: number;
  /** The common contrast scale a (0 when no micrograph is linear or nothing correlates). */
  readonly amplitude: number;
  readonly perCondition: readonly { readonly r2: number; readonly amplitude: number }[];
}

export const DEFAULT_SPREAD = 1.5;
/** A simulation window whose sum of squares is below this fraction of the micrograph's is flat. */
export const FLAT_RATIO = 1e-12;

function r2(a: number, p: PairStats): number {
  if (!(p.cc > 0)) return 0;
  return (2 * a * p.cs - a * a * p.ss) / p.cc + 0;
}

/**
 * The contrast scales that maximise the mean R2 (see the module comment).
 * linear[i] false: condition i has a free scale. Exact: the objective is
 * quadratic in a between the points where a clamp switches, so each piece
 * is maximised in closed form.
 */
export function fitAmplitudes(stats: readonly PairStats[], linear: readonly boolean[], spread = DEFAULT_SPREAD): AmplitudeFit {
  const n = stats.length;
  if (n === 0) return { score: 0, amplitude: 0, perCondition: [] };
  if (!(spread >= 1)) throw new RangeError(`fitAmplitudes: spread must be >= 1, got ${spread}`);
  // a simulation flat to rounding (ss below 1e-12 of the micrograph's cc) explains nothing: scale 0, not cs/ss ~ 1e20
  const flat = stats.map((p) => !(p.ss > FLAT_RATIO * p.cc));
  const free = stats.map((p, i) => (flat[i] ? 0 : p.cs / p.ss));
  const tied = stats.map((p, i) => linear[i] && !flat[i] && p.cc > 0);
  const scaleAt = (i: number, a: number) => (tied[i] ? Math.min(a * spread, Math.max(a / spread, free[i])) : Math.max(0, free[i]));
  const objective = (a: number) => {
    let s = 0;
    for (let i = 0; i < n; i++) s += r2(scaleAt(i, a), stats[i]);
    return s / n;
  };
  let bestA = 0;
  let best = objective(0);
  if (tied.some((t) => t)) {
    const breaks = [0];
    tied.forEach((t, i) => {
      if (t && free[i] > 0) breaks.push(free[i] / spread, free[i] * spread);
    });
    breaks.sort((x, y) => x - y);
    const top = breaks[breaks.length - 1];
    breaks.push(top > 0 ? 4 * top : 1);
    for (let j = 0; j + 1 < breaks.length; j++) {
      const lo = breaks[j];
      const hi = breaks[j + 1];
      if (!(hi > lo)) continue;
      const mid = 0.5 * (lo + hi);
      // on this piece a_i = k_i a (k_i = spread or 1/spread) or a constant f_i: objective = A a - B a^2 + const
      let A = 0;
      let B = 0;
      for (let i = 0; i < n; i++) {
        if (!tied[i]) continue;
        const p = stats[i];
        let k: number;
        if (free[i] > mid * spread) k = spread;
        else if (free[i] < mid / spread) k = 1 / spread;
        else continue;
        A += (2 * k * p.cs) / p.cc;
        B += (k * k * p.ss) / p.cc;
      }
      const trial = [lo, hi];
      if (B > 0) trial.push(Math.min(hi, Math.max(lo, A / (2 * B))));
      for (const a of trial) {
        const v = objective(a);
        if (v > best + 1e-15) {
          best = v;
          bestA = a;
        }
      }
    }
  }
  return {
    score: best,
    amplitude: bestA,
    perCondition: stats.map((p, i) => {
      const a = scaleAt(i, bestA);
      return { r2: r2(a, p), amplitude: a };
    }),
  };
}

/** Rule constants (see the module comment). */
export const DEFAULT_SIGMAS = 3;
export const SCORE_FLOOR = 0.002;
/** Below this best score the statement warns that hardly anything is explained. */
export const WEAK_SCORE = 0.02;

export interface Comparison {
  readonly candidate: string;
  /** score(best) - score(candidate). */
  readonly gap: number;
  /** Bootstrap standard deviation of the gap (undefined when not resampled). */
  readonly gapSigma?: number;
  /** Spread of the gap across the fitted parameter ranges (0 when nothing was fitted). */
  readonly modelSpread: number;
  /** The gap needed to exclude this candidate: max(sigmas x gapSigma + modelSpread, floor). */
  readonly threshold: number;
  readonly excluded: boolean;
}

export interface Verdict {
  readonly decision: 'identified' | 'cannot tell' | 'no candidate explains';
  readonly best: string;
  readonly runnerUp?: string;
  /** score(best) - score(runner-up). */
  readonly gap: number;
  readonly gapSigma: number;
  /** The gap needed to exclude the runner-up: max(sigmas x gapSigma + modelSpread, floor). */
  readonly threshold: number;
  /** The runner-up's spread of the gap across the fitted parameter ranges. */
  readonly modelSpread: number;
  /** The best candidate and every candidate it does not exclude. */
  readonly indistinguishable: readonly string[];
  readonly comparisons: readonly Comparison[];
  readonly replicates: number;
  readonly rule: string;
  /** One sentence for the user. */
  readonly statement: string;
}

/**
 * Verdict from the observed scores (sorted, best first) and the bootstrap
 * scores replicates[b][k] of the first K candidates (same order).
 */
export function decide(
  labels: readonly string[],
  scores: readonly number[],
  replicates: readonly (readonly number[])[],
  sigmas = DEFAULT_SIGMAS,
  floor = SCORE_FLOOR,
  model?: { readonly spreads: readonly number[]; readonly fitted: boolean },
): Verdict {
  if (labels.length === 0) throw new RangeError('decide: no candidates');
  const B = replicates.length;
  const K = B > 0 ? replicates[0].length : 0;
  const comparisons: Comparison[] = [];
  for (let k = 1; k < labels.length; k++) {
    const gap = scores[0] - scores[k];
    let gapSigma: number | undefined;
    if (k < K && B >= 2) {
      let m = 0;
      for (const r of replicates) m += r[0] - r[k];
      m /= B;
      let v = 0;
      for (const r of replicates) v += (r[0] - r[k] - m) ** 2;
      gapSigma = Math.sqrt(v / (B - 1));
    }
    // a candidate beyond the resampled ones is judged with the largest sigma seen (conservative)
    const sigma = gapSigma ?? Math.max(0, ...comparisons.map((c) => c.gapSigma ?? 0));
    const modelSpread = model?.spreads[k] ?? 0;
    const threshold = Math.max(sigmas * sigma + modelSpread, floor);
    const excluded = gap > threshold;
    comparisons.push(gapSigma === undefined ? { candidate: labels[k], gap, modelSpread, threshold, excluded } : { candidate: labels[k], gap, gapSigma, modelSpread, threshold, excluded });
  }
  const indistinguishable = [labels[0], ...comparisons.filter((c) => !c.excluded).map((c) => c.candidate)];
  const runner = comparisons[0];
  const gap = runner?.gap ?? Infinity;
  const gapSigma = runner?.gapSigma ?? 0;
  const threshold = runner?.threshold ?? floor;
  const modelSpread = runner?.modelSpread ?? 0;
  const decision = indistinguishable.length === 1 ? 'identified' : 'cannot tell';
  const fitted = model?.fitted === true;
  const rule =
    `A candidate is excluded when its score is below the best by more than ${sigmas} standard deviations of the gap ` +
    `(estimated from ${B} bootstrap copies of the micrographs: the best candidate's fitted image plus its residual resampled in blocks, registration shift re-optimised)` +
    (fitted
      ? ' plus the spread of the gap across the fitted parameter ranges (half the range of the gap evaluated with both candidates at the best candidate\'s fitted parameters, at the other\'s, and each at its own; for a candidate that was not fitted, its score is first raised by the largest gain any fitted candidate got from fitting)'
      : '') +
    ` and by more than ${floor} (the registration's own precision). Each candidate has its own needed gap. The best candidate is identified only when it excludes every other candidate, no micrograph is flagged as inconsistent, and the best candidate leaves no structured residual well above the micrographs' noise.`;
  const fmt = (x: number) => sig(x, 3);
  const statement =
    decision === 'identified'
      ? `${labels[0]} explains the micrographs best; the runner-up ${runner ? `(${runner.candidate}) scores ${fmt(gap)} lower, ${gapSigma > 0 ? `${fmt(gap / gapSigma)} standard deviations of the pixel noise` : 'beyond the pixel noise'}${fitted ? ` (needed ${fmt(threshold)}, of which ${fmt(modelSpread)} for the parameter ranges)` : ''}` : 'does not exist'}.` +
        (fitted
          ? ' Thickness, depth, line direction and w were fitted within the stated ranges for the leading candidates; errors outside those ranges are not covered.'
          : ' The noise estimate covers the micrographs\' pixel noise only, not errors of the model or of the stated thickness, deviation, depth and angles.')
      : `${indistinguishable.join(', ')} explain the micrographs equally well within the noise${fitted ? ' and the parameter ranges' : ''} (gap to the runner-up ${fmt(gap)}, needed ${fmt(threshold)}); a defect that is not among the candidates may also fit better than any of them.`;
  const weak =
    scores[0] < WEAK_SCORE
      ? ` The best candidate explains only ${fmt(100 * Math.max(0, scores[0]))} % of the micrographs' contrast variance: the micrographs may show no contrast from this defect, or no candidate fits.`
      : '';
  return {
    decision,
    best: labels[0],
    ...(runner ? { runnerUp: runner.candidate } : {}),
    gap,
    gapSigma,
    threshold,
    modelSpread,
    indistinguishable,
    comparisons,
    replicates: B,
    rule,
    statement: statement + weak,
  };
}

/**
 * Correlation length of a residual image (pixels): the first lag at which the
 * autocorrelation along x and y (averaged) falls below 1/e; at least 1.
 */
export function correlationLength(r: Float64Array, w: number, h: number): number {
  let v0 = 0;
  for (let k = 0; k < w * h; k++) v0 += r[k] * r[k];
  if (!(v0 > 0)) return 1;
  const maxLag = Math.max(1, Math.floor(Math.min(w, h) / 4));
  for (let lag = 1; lag <= maxLag; lag++) {
    let sx = 0;
    let nx = 0;
    for (let y = 0; y < h; y++) for (let x = 0; x + lag < w; x++, nx++) sx += r[y * w + x] * r[y * w + x + lag];
    let sy = 0;
    let ny = 0;
    for (let y = 0; y + lag < h; y++) for (let x = 0; x < w; x++, ny++) sy += r[y * w + x] * r[(y + lag) * w + x];
    const rho = 0.5 * (sx / nx + sy / ny) / (v0 / (w * h));
    if (rho < 1 / Math.E) return lag;
  }
  return maxLag;
}

/**
 * Moving-block bootstrap in two dimensions: out is tiled with square blocks
 * of side `block` copied from random positions of `src` (w x h).
 */
export function blockResample(out: Float64Array, src: Float64Array, w: number, h: number, block: number, random: () => number): Float64Array {
  const bw = Math.min(block, w);
  const bh = Math.min(block, h);
  for (let y0 = 0; y0 < h; y0 += bh) {
    for (let x0 = 0; x0 < w; x0 += bw) {
      const sx = Math.floor(random() * (w - bw + 1));
      const sy = Math.floor(random() * (h - bh + 1));
      for (let y = 0; y < bh && y0 + y < h; y++) {
        for (let x = 0; x < bw && x0 + x < w; x++) out[(y0 + y) * w + x0 + x] = src[(sy + y) * w + sx + x];
      }
    }
  }
  return out;
}
