/**
 * Identification: simulate every candidate under every micrograph's
 * condition, register each simulation to its micrograph, score the
 * candidates over all micrographs together, and judge whether the best one
 * stands out from the noise (ranking.ts explains the score and the rule).
 *
 * Work plan (rendering dominates; registration is a few ms per pair):
 *  1. render each candidate once per micrograph, in the micrograph's view
 *     (g at the micrograph's angle, its pixel size, crop plus margin);
 *  2. register every candidate by shift only, score, rank;
 *  3. register the leading candidates with rotation and scale as well; the
 *     micrograph's rotation and scale found for the best of them are then
 *     used for all other candidates (they belong to the micrograph, not the
 *     candidate), shift re-optimised; rank again (repeat if the leaders change);
 *  4. bootstrap the leaders' scores for the verdict.
 */
import type { Scenario } from '../scenario/types.js';
import { InputError } from '../errors.js';
import type { ConditionImages } from '../imaging/renderScenario.js';
import { identificationCandidates, variantScenario, visibilityNote, type Candidate, type VisibilityNote } from './candidates.js';
import { conditionView } from './identifyView.js';
import type { PreparedMicrograph } from './identifyMicrographs.js';
import { seededRandom } from './identifyRandom.js';
import { gaussianBlur, removePlane } from './preprocess.js';
import { blockResample, correlationLength, decide, DEFAULT_SIGMAS, DEFAULT_SPREAD, fitAmplitudes, pairStats, type PairStats, type Verdict } from './ranking.js';
import { DEFAULT_MAX_ROTATION_DEG, DEFAULT_MAX_SCALE, createCorrelator, extractWindow, findPeak, register, type Correlator, type PreparedTemplate, type RegistrationOptions, type RegistrationResult } from './registration.js';
import { flipRowsView, imageView, toFloat64 } from '../imaging/imageView.js';
import { describeElasticity } from '../elasticity/elasticityNote.js';
import { describeSurfaces } from '../imaging/surfaceNote.js';

/** Renders a scenario (one condition) into its images; the CLI passes renderScenario with one shared pool. */
export type Renderer = (sc: Scenario) => Promise<readonly ConditionImages[]>;

export interface IdentifyOptions {
  /** Index of the defect to identify (default 0). */
  readonly defectIndex?: number;
  /** Number of leading candidates registered with rotation and scale, bootstrapped and shown (default 4). */
  readonly top?: number;
  /** Bootstrap replicates (default 50). */
  readonly bootstrap?: number;
  /** Seed of the bootstrap's random numbers (default 1). */
  readonly seed?: number;
  readonly sigmas?: number;
  /** Largest factor by which the contrast scale of one micrograph may differ from the common one (default 1.5). */
  readonly amplitudeSpread?: number;
  readonly registration?: RegistrationOptions;
  readonly onProgress?: (message: string, fraction: number) => void;
}

export interface ConditionScore {
  readonly condition: string;
  /** Fraction of the micrograph's contrast variance explained (can be negative). */
  readonly r2: number;
  /** Normalised cross-correlation at the registration. */
  readonly ncc: number;
  /** Contrast scale applied to the simulation. */
  readonly amplitude: number;
  readonly shift_nm: readonly [number, number];
  readonly rotation_deg: number;
  readonly scale: number;
  /** g.b (or g.R) with the rule-of-thumb verdict. */
  readonly visibility: VisibilityNote;
}

export interface RankedCandidate {
  readonly candidate: string;
  readonly kind: Candidate['kind'];
  readonly score: number;
  readonly amplitude: number;
  readonly perCondition: readonly ConditionScore[];
  /** Rotation and scale searched for this candidate itself (the leaders) or taken from the best. */
  readonly fullySearched: boolean;
}

export interface IdentifyResult {
  readonly scenario: string;
  /** The elasticity the simulations used, in one sentence (src/elasticity/elasticityNote.ts). */
  readonly elasticity: string;
  /** The foil surfaces (relaxed or infinite medium), in one sentence (src/imaging/surfaceNote.ts). */
  readonly surfaces: string;
  readonly defectIndex: number;
  readonly defectLabel: string;
  readonly micrographs: readonly PreparedMicrograph[];
  readonly ranking: readonly RankedCandidate[];
  readonly candidates: readonly Candidate[];
  readonly verdict: Verdict;
  /** Registered simulation windows (relative contrast) of the leading candidates, [rank][micrograph]. */
  readonly leaderImages: readonly (readonly Float64Array[])[];
  readonly settings: { readonly top: number; readonly bootstrap: number; readonly seed: number; readonly sigmas: number; readonly amplitudeSpread: number };
  readonly seconds: { readonly render: number; readonly register: number; readonly bootstrap: number };
}

interface Pair {
  reg: RegistrationResult;
  /** Registered window with its plane removed. */
  window: Float64Array;
  stats: PairStats;
  full: boolean;
}

export async function identify(sc: Scenario, micrographs: readonly PreparedMicrograph[], render: Renderer, opts: IdentifyOptions = {}): Promise<IdentifyResult> {
  const defectIndex = opts.defectIndex ?? 0;
  const candidates = identificationCandidates(sc, defectIndex);
  const top = Math.max(1, Math.min(candidates.length, opts.top ?? 4));
  const B = opts.bootstrap ?? 50;
  const seed = opts.seed ?? 1;
  const sigmas = opts.sigmas ?? DEFAULT_SIGMAS;
  const spread = opts.amplitudeSpread ?? DEFAULT_SPREAD;
  const regOpts = opts.registration ?? {};
  const progress = opts.onProgress ?? (() => undefined);
  const nC = micrographs.length;
  const linear = micrographs.map((m) => m.settings.intensity === 'linear');

  // 1. simulations in each micrograph's view
  const t0 = performance.now();
  const sims: Float64Array[][] = [];
  let done = 0;
  for (const cand of candidates) {
    const vsc = variantScenario(sc, cand);
    const row: Float64Array[] = [];
    for (const m of micrographs) {
      progress(`simulating ${cand.label} under ${m.conditionId}`, done / (candidates.length * nC));
      row.push(await simulateView(vsc, m, render));
      done++;
    }
    sims.push(row);
  }
  const t1 = performance.now();

  // 2. shift-only registration of everything
  const cors: Correlator[] = micrographs.map((m) => createCorrelator(m.width, m.height, m.width + 2 * m.margin, m.height + 2 * m.margin, 1e-5));
  const tpls: PreparedTemplate[] = micrographs.map((m, i) => cors[i].prepareTemplate(m.contrast));
  const pairFor = (k: number, i: number, full: boolean, start?: { rotation_deg: number; scale: number }, close = false): Pair => {
    const m = micrographs[i];
    const fine = close ? { initialRotationStep_deg: 1, initialScaleStep: 0.01 } : {};
    const reg = register(cors[i], tpls[i], sims[k][i], { ...regOpts, ...fine, search: full, ...(start ? { start } : {}) });
    const window = removePlane(new Float64Array(reg.window.length), reg.window, m.width, m.height);
    return { reg, window, stats: pairStats(m.contrast, window), full };
  };
  progress('registering', 0);
  const pairs: Pair[][] = candidates.map((_, k) => micrographs.map((_, i) => pairFor(k, i, false)));
  const viewOf = (k: number, i: number) => ({ rotation_deg: pairs[k][i].reg.rotation_deg, scale: pairs[k][i].reg.scale });
  const scoreOf = (k: number) => fitAmplitudes(pairs[k].map((p) => p.stats), linear, spread);
  const rank = () => candidates.map((_, k) => ({ k, score: scoreOf(k).score })).sort((a, b) => b.score - a.score || a.k - b.k).map((e) => e.k);

  // 3. rotation and scale for the leaders, then for everyone from the best leader
  let order = rank();
  let applied: { rotation_deg: number; scale: number }[] | null = null;
  for (let round = 0; round < 4; round++) {
    const leaders = order.slice(0, top);
    if (round > 0 && leaders.every((k) => pairs[k][0].full)) break;
    for (const k of leaders) {
      if (pairs[k][0].full) continue;
      // the first full search starts from no rotation; later ones start near the best view found so far
      const near = order.find((j) => pairs[j][0].full);
      pairs[k] = micrographs.map((_, i) => (near === undefined ? pairFor(k, i, true) : pairFor(k, i, true, viewOf(near, i), true)));
    }
    const bestFull = order.find((k) => pairs[k][0].full)!;
    const view = pairs[bestFull].map((p) => ({ rotation_deg: p.reg.rotation_deg, scale: p.reg.scale }));
    const same = applied !== null && view.every((v, i) => v.rotation_deg === applied![i].rotation_deg && v.scale === applied![i].scale);
    if (!same) {
      for (let k = 0; k < candidates.length; k++) if (!pairs[k][0].full) pairs[k] = micrographs.map((_, i) => pairFor(k, i, false, view[i]));
      applied = view;
    }
    order = rank();
    progress('registering', (round + 1) / 4);
  }
  const anchor = order.find((j) => pairs[j][0].full)!;
  for (const k of order.slice(0, top)) if (!pairs[k][0].full) pairs[k] = micrographs.map((_, i) => pairFor(k, i, true, viewOf(anchor, i), true));
  order = rank();
  const t2 = performance.now();

  // 4. bootstrap of the leaders (the fully registered prefix of the ranking)
  const firstPartial = order.findIndex((k) => !pairs[k][0].full);
  const leaders = order.slice(0, Math.min(top, firstPartial < 0 ? order.length : firstPartial));
  const replicates = bootstrap(micrographs, cors, pairs, leaders, linear, spread, B, seed, (f) => progress('estimating the noise of the scores', f));
  const t3 = performance.now();

  const labels = order.map((k) => candidates[k].label);
  const fits = order.map((k) => scoreOf(k));
  const verdict = decide(labels, fits.map((f) => f.score), replicates, sigmas);
  const lattice = sc.material.lattice;
  const ranking: RankedCandidate[] = order.map((k, r) => ({
    candidate: candidates[k].label,
    kind: candidates[k].kind,
    score: fits[r].score,
    amplitude: fits[r].amplitude,
    fullySearched: pairs[k][0].full,
    perCondition: micrographs.map((m, i) => {
      const p = pairs[k][i];
      return {
        condition: m.conditionId,
        r2: fits[r].perCondition[i].r2,
        ncc: p.reg.ncc,
        amplitude: fits[r].perCondition[i].amplitude,
        shift_nm: [p.reg.shiftX_px * m.pixel_nm, p.reg.shiftY_px * m.pixel_nm] as const,
        rotation_deg: p.reg.rotation_deg,
        scale: p.reg.scale,
        visibility: visibilityNote(lattice, candidates[k], m.condition),
      };
    }),
  }));
  // registrations of the best candidate that ended at a search limit: a sign of a wrong pixel size or g angle,
  // or of a candidate that does not fit
  const best = ranking[0];
  const maxR = regOpts.maxRotation_deg ?? DEFAULT_MAX_ROTATION_DEG;
  const maxS = regOpts.maxScale ?? DEFAULT_MAX_SCALE;
  const atLimit = best
    ? best.perCondition.filter((p) => Math.abs(p.rotation_deg) >= maxR - 1e-6 || Math.abs(p.scale - 1) >= maxS - 1e-6).map((p) => p.condition)
    : [];
  const limitNote = atLimit.length
    ? ` Registration of the best candidate ended at the edge of its search range (rotation ${maxR} degrees or scale ${100 * maxS} %) for ${atLimit.join(', ')}; the scale of images of straight lines is only weakly constrained, but if the pixel size or the direction of g there may be wrong, check them.`
    : '';
  return {
    scenario: sc.name,
    elasticity: describeElasticity(sc).text,
    surfaces: describeSurfaces(sc).text,
    defectIndex,
    defectLabel: sc.defects[defectIndex].label,
    micrographs,
    ranking,
    candidates: order.map((k) => candidates[k]),
    verdict: limitNote ? { ...verdict, statement: verdict.statement + limitNote } : verdict,
    leaderImages: order.slice(0, top).map((k) => pairs[k].map((p) => p.reg.window)),
    settings: { top, bootstrap: B, seed, sigmas, amplitudeSpread: spread },
    seconds: { render: (t1 - t0) / 1000, register: (t2 - t1) / 1000, bootstrap: (t3 - t2) / 1000 },
  };
}

/**
 * One candidate's simulation in a micrograph's view: relative contrast
 * I / I_background - 1 of the chosen field, mirrored and blurred as the
 * micrograph settings say, on the crop plus margin.
 */
export async function simulateView(vsc: Scenario, m: PreparedMicrograph, render: Renderer): Promise<Float64Array> {
  const W = m.width + 2 * m.margin;
  const H = m.height + 2 * m.margin;
  // a mirrored micrograph: render with g at the mirrored angle, then flip top to bottom
  const angle = m.settings.mirrored ? -m.gAngle_deg : m.gAngle_deg;
  const imgs = await render(conditionView(vsc, m.condition, angle, W, H, m.pixel_nm));
  const ci = imgs[0];
  const field = m.settings.field;
  const src = field === 'bf' ? ci.bf : ci.df;
  const bg = ci.background[field];
  if (!(bg > 1e-9)) {
    throw new InputError(
      `micrographs.${m.conditionId}.field: the perfect crystal gives no ${field === 'df' ? 'dark' : 'bright'}-field intensity under ${m.conditionId} at this thickness, so relative contrast is undefined; compare the ${field === 'df' ? 'bright' : 'dark'}-field micrograph instead`,
    );
  }
  const view = imageView(src, W, H);
  const rel = toFloat64(m.settings.mirrored ? flipRowsView(view) : view);
  for (let k = 0; k < rel.length; k++) rel[k] = rel[k] / bg - 1;
  // A detector pixel integrates over its area: a box of width p has the variance p^2/12, added here as a
  // Gaussian to the point spread of the microscope (without it, point-sampled simulations are too sharp
  // and the scale search drifts to magnify them).
  const sigma_px = Math.sqrt((m.settings.blur_nm / m.pixel_nm) ** 2 + 1 / 12);
  return gaussianBlur(new Float64Array(W * H), rel, W, H, sigma_px);
}

/**
 * Bootstrap scores of the leaders: replicates[b][j] for leader j (in the
 * given order). Each copy of micrograph i is the best leader's fitted image
 * plus its residual resampled in blocks (ranking.ts); every leader is
 * re-registered (shift only, its rotation and scale kept) and re-scored.
 */
function bootstrap(
  micrographs: readonly PreparedMicrograph[],
  cors: readonly Correlator[],
  pairs: readonly (readonly Pair[])[],
  leaders: readonly number[],
  linear: readonly boolean[],
  spread: number,
  B: number,
  seed: number,
  progress: (f: number) => void,
): number[][] {
  if (B < 2 || leaders.length < 2) return [];
  const rnd = seededRandom(seed);
  const best = leaders[0];
  const fit = fitAmplitudes(pairs[best].map((p) => p.stats), linear, spread);
  const models = micrographs.map((m, i) => {
    const a = fit.perCondition[i].amplitude;
    const w = pairs[best][i].window;
    const model = new Float64Array(w.length);
    for (let k = 0; k < w.length; k++) model[k] = a * w[k];
    const resid = new Float64Array(w.length);
    for (let k = 0; k < w.length; k++) resid[k] = m.contrast[k] - model[k];
    const block = Math.max(4, Math.min(Math.floor(Math.min(m.width, m.height) / 2), 3 * correlationLength(resid, m.width, m.height)));
    return { model, resid, block };
  });
  const prepared = leaders.map((k) => micrographs.map((_, i) => cors[i].prepareImage(pairs[k][i].reg.transformed)));
  const maps = cors.map((c) => new Float64Array(c.mapWidth * c.mapHeight));
  const out: number[][] = [];
  for (let b = 0; b < B; b++) {
    const stats: PairStats[][] = leaders.map(() => []);
    micrographs.forEach((m, i) => {
      const n = m.width * m.height;
      const copy = blockResample(new Float64Array(n), models[i].resid, m.width, m.height, models[i].block, rnd.uniform);
      for (let k = 0; k < n; k++) copy[k] += models[i].model[k];
      const c = removePlane(new Float64Array(n), copy, m.width, m.height);
      const tpl = cors[i].prepareTemplate(c);
      const win = new Float64Array(n);
      leaders.forEach((k, j) => {
        cors[i].ncc(prepared[j][i], tpl, maps[i]);
        const peak = findPeak(maps[i], cors[i].mapWidth, cors[i].mapHeight);
        const reg = pairs[k][i].reg;
        extractWindow(win, reg.transformed, cors[i].imageWidth, cors[i].imageHeight, peak.x, peak.y, m.width, m.height);
        stats[j].push(pairStats(c, removePlane(new Float64Array(n), win, m.width, m.height)));
      });
    });
    out.push(stats.map((s) => fitAmplitudes(s, linear, spread).score));
    progress((b + 1) / B);
  }
  return out;
}
