/**
 * Fit of one candidate's nuisance parameters (nuisance.ts) to the
 * micrographs: the score of ranking.ts (mean R2 with the tied contrast
 * scales) is maximised over the parameters within their ranges.
 *
 * Cost: every evaluation is a set of renders, so the fit works on small views
 * (the micrographs binned to at most FIT_SIDE pixels a side), renders along
 * the defect's line (simulateView.ts: the shared-column path), keeps the
 * micrograph's rotation and scale from the candidate's registration (they
 * belong to the micrograph) and re-optimises only the shift (one FFT
 * correlation), and caches each micrograph's statistics by the parameters
 * that affect it, so that changing the w of one micrograph re-renders only
 * that micrograph. Order of the search (the score oscillates with thickness
 * and depth, thickness fringes, so a local search from the stated values
 * alone can stop in the wrong fringe):
 *   0. a coarse grid over thickness and depth (GRID x GRID points, stated w);
 *   1. w of each micrograph alone, golden-section search over its range
 *      (one render per evaluation);
 *   2. the shared parameters (thickness, depth, line tilt) together by
 *      Nelder-Mead in the box of their ranges, scaled to unit sides;
 *   3. w of each micrograph again, over a third of its range about the value
 *      found.
 * The caller re-renders the result at full size and keeps it only if it
 * scores better than the stated parameters there too.
 */
import type { PreparedMicrograph } from './identifyMicrographs.js';
import { binImage, planeRemoved, removePlane } from './preprocess.js';
import { fitAmplitudes, pairStats, type PairStats } from './ranking.js';
import { createCorrelator, register, type Correlator, type PreparedTemplate } from './registration.js';
import { goldenSection, nelderMead } from './boundedMinimise.js';
import type { NuisanceModel } from './nuisance.js';
import { simulateView, type Renderer } from './simulateView.js';

/** Largest side of the views the fit works on (pixels). */
export const FIT_SIDE = 32;
/** Points per axis of the coarse thickness x depth grid. */
export const GRID = 4;

export interface FitView {
  readonly micrograph: PreparedMicrograph;
  readonly cor: Correlator;
  readonly tpl: PreparedTemplate;
}

/** Micrographs binned for the fit (shared by all candidates). */
export function fitViews(micrographs: readonly PreparedMicrograph[]): FitView[] {
  return micrographs.map((m) => {
    const b = Math.max(1, Math.ceil(Math.min(m.width, m.height) / FIT_SIDE - 1e-9));
    let v: PreparedMicrograph = m;
    if (b > 1) {
      const g = binImage({ width: m.width, height: m.height, data: m.contrast }, b);
      const contrast = removePlane(new Float64Array(g.width * g.height), g.data, g.width, g.height);
      v = { ...m, width: g.width, height: g.height, pixel_nm: m.pixel_nm * b, contrast, margin: Math.max(1, Math.ceil(m.margin / b)) };
    }
    const cor = createCorrelator(v.width, v.height, v.width + 2 * v.margin, v.height + 2 * v.margin, 1e-5);
    return { micrograph: v, cor, tpl: cor.prepareTemplate(v.contrast) };
  });
}

export interface CandidateFit {
  readonly values: readonly number[];
  /** Objective on the small views at the stated values and at the fitted ones. */
  readonly nominalScore: number;
  readonly fittedScore: number;
  /** Renders spent. */
  readonly renders: number;
}

export interface FitInputs {
  readonly model: NuisanceModel;
  readonly views: readonly FitView[];
  /** Rotation and scale of each micrograph (from the candidate's registration). */
  readonly view: readonly { readonly rotation_deg: number; readonly scale: number }[];
  readonly linear: readonly boolean[];
  readonly spread: number;
  readonly render: Renderer;
  readonly defectIndex: number;
  /** Called with the fraction of the fit done. */
  readonly progress?: (fraction: number) => void;
}

export async function fitCandidate(inp: FitInputs): Promise<CandidateFit> {
  const { model, views } = inp;
  const P = model.parameters;
  const nC = views.length;
  const shared = P.map((p, i) => (p.scope === 'shared' ? i : -1)).filter((i) => i >= 0);
  const own = views.map((_, c) => P.map((p, i) => (p.scope === c ? i : -1)).filter((i) => i >= 0));
  const cache = views.map(() => new Map<string, Promise<PairStats>>());
  let renders = 0;
  const statsOf = (c: number, v: readonly number[]): Promise<PairStats> => {
    const key = [...shared, ...own[c]].map((i) => v[i].toPrecision(9)).join(' ');
    const hit = cache[c].get(key);
    if (hit) return hit;
    const { scenario, conditions } = model.apply(v);
    const fv = views[c];
    const m = { ...fv.micrograph, condition: conditions[c] };
    const st = simulateView(scenario, m, inp.render, { defectIndex: inp.defectIndex }).then((sim) => {
      const reg = register(fv.cor, fv.tpl, sim, { search: false, start: inp.view[c] });
      const w = planeRemoved(m, reg);
      return pairStats(m.contrast, w);
    });
    renders++;
    cache[c].set(key, st);
    return st;
  };
  // the micrographs of one evaluation are rendered side by side (a render pool with workers runs them in parallel)
  const score = async (v: readonly number[]) => fitAmplitudes(await Promise.all(views.map((_, c) => statsOf(c, v))), inp.linear, inp.spread).score;
  const x = P.map((p) => p.nominal);
  const nominalScore = await score(x);
  let best = nominalScore;
  const total = 2 * nC + 1;
  let step = 0;
  const tick = () => inp.progress?.(++step / total);

  const oneByOne = async (narrow: number) => {
    for (let c = 0; c < nC; c++) {
      for (const i of own[c]) {
        const p = P[i];
        const half = (0.5 * (p.hi - p.lo)) / narrow;
        const lo = Math.max(p.lo, x[i] - half);
        const hi = Math.min(p.hi, x[i] + half);
        const r = await goldenSection(async (t) => -(await score(x.map((v, j) => (j === i ? t : v)))), lo, hi, (p.hi - p.lo) / 30, narrow === 1 ? 7 : 4);
        if (-r.value > best) {
          best = -r.value;
          x[i] = r.x[0];
        }
      }
      tick();
    }
  };
  // 0. coarse grid over the first two shared parameters (thickness, depth)
  const gridParams = shared.filter((i) => P[i].name === 'thickness' || P[i].name === 'depth');
  if (gridParams.length > 0) {
    const axes = gridParams.map((i) => Array.from({ length: GRID }, (_, k) => P[i].lo + ((k + 0.5) / GRID) * (P[i].hi - P[i].lo)));
    const points: number[][] = gridParams.length === 1 ? axes[0].map((a) => [a]) : axes[0].flatMap((a) => axes[1].map((b) => [a, b]));
    for (const pt of points) {
      const y = [...x];
      gridParams.forEach((i, k) => (y[i] = pt[k]));
      const v = await score(y);
      if (v > best) {
        best = v;
        gridParams.forEach((i, k) => (x[i] = pt[k]));
      }
    }
  }
  await oneByOne(1);
  if (shared.length > 0) {
    const lo = shared.map(() => 0);
    const hi = shared.map(() => 1);
    const toX = (u: readonly number[]) => {
      const y = [...x];
      shared.forEach((i, k) => (y[i] = P[i].lo + u[k] * (P[i].hi - P[i].lo)));
      return y;
    };
    const u0 = shared.map((i) => (P[i].hi > P[i].lo ? (x[i] - P[i].lo) / (P[i].hi - P[i].lo) : 0.5));
    const r = await nelderMead(async (u) => -(await score(toX(u))), u0, lo, hi, { step: shared.map(() => 0.25), maxEvaluations: 3 * shared.length + 4, xTol: 0.01, fTol: 1e-5 });
    if (-r.value > best) {
      best = -r.value;
      const y = toX(r.x);
      for (const i of shared) x[i] = y[i];
    }
  }
  tick();
  await oneByOne(3);
  return { values: x, nominalScore, fittedScore: best, renders };
}
