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
import { InputError, InternalError } from '../errors.js';
import { identificationCandidates, variantScenario, visibilityNote, type Candidate, type VisibilityNote } from './candidates.js';
import { simulateView, type Renderer } from './simulateView.js';
import { cachedRenderer } from './renderCache.js';
import { DEFAULT_FIT, type FitSettings } from './fitSettings.js';
import { nuisanceModel } from './nuisance.js';
import { fitCandidate, fitViews } from './fitCandidate.js';
import { absoluteFit, edgeFlag, finalVerdict, flipFlag, FLIP_MARGIN, freeR2, type AbsoluteFit, type ConsistencyFlag } from './identifyChecks.js';
import type { Condition } from '../scenario/types.js';
import { viewGroups, type PreparedMicrograph } from './identifyMicrographs.js';
import { seededRandom } from './identifyRandom.js';
import { planeRemoved, removePlane } from './preprocess.js';
import { blockResample, correlationLength, decide, DEFAULT_SIGMAS, DEFAULT_SPREAD, fitAmplitudes, pairStats, type PairStats, type Verdict } from './ranking.js';
import { DEFAULT_MAX_ROTATION_DEG, DEFAULT_MAX_SCALE, createCorrelator, extractWindow, findPeak, register, registerGroup, type Correlator, type PreparedTemplate, type RegistrationOptions, type RegistrationResult } from './registration.js';
import { describeElasticity } from '../elasticity/elasticityNote.js';
import { resolveCondition } from '../imaging/resolveCondition.js';
import { describeSurfaces } from '../imaging/surfaceNote.js';

export type { Renderer } from './simulateView.js';

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
  /** Ranges of the fitted nuisance parameters (fitSettings.ts; default DEFAULT_FIT); false: nothing is fitted. */
  readonly fit?: FitSettings | false;
  readonly onProgress?: (message: string, fraction: number) => void;
  /**
   * Simulations made beforehand, [candidate][micrograph] in the order of identificationCandidates and of the
   * micrographs (the shards of a cluster run, merged; see simulateCandidates): used instead of rendering.
   */
  readonly simulations?: readonly (readonly Float64Array[])[];
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
  /** The nuisance fit of this candidate (leaders only, when fitting is on). */
  readonly fit?: CandidateFitReport;
}

export interface FittedParameter {
  readonly name: string;
  readonly unit: string;
  readonly nominal: number;
  readonly value: number;
  readonly lo: number;
  readonly hi: number;
  readonly from: string;
  /** The value sits within 2 % of the range at one of its ends. */
  readonly atLimit: boolean;
}

export interface CandidateFitReport {
  readonly parameters: readonly FittedParameter[];
  /** Tilt of the line from the stated direction (degrees), when the line was fitted. */
  readonly lineTilt_deg?: number;
  /** Score with the stated parameters and with the fitted ones (full-size views). */
  readonly nominalScore: number;
  readonly fittedScore: number;
  /** false: the fit did not improve the full-size score, the stated values were kept. */
  readonly improved: boolean;
  readonly renders: number;
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
  readonly settings: { readonly top: number; readonly bootstrap: number; readonly seed: number; readonly sigmas: number; readonly amplitudeSpread: number; readonly fit: FitSettings | false };
  /** Pixel noise per micrograph and the structure the best candidate leaves (identifyChecks.ts). */
  readonly absolute: AbsoluteFit;
  /** Micrographs flagged as inconsistent with the best candidate as stated. */
  readonly flags: readonly ConsistencyFlag[];
  /** Per micrograph: the best score as stated, and the best score of any leading candidate with that micrograph's g reversed or its image mirrored. */
  readonly consistency: readonly { readonly condition: string; readonly scoreStated: number; readonly scoreReversed: number; readonly scoreMirrored: number }[];
  /** Wall seconds per step; checks: the parameter spread and the consistency checks (their renders are asked for before the bootstrap). */
  readonly seconds: { readonly render: number; readonly register: number; readonly fit: number; readonly bootstrap: number; readonly checks: number };
}

/** Rotation and scale steps of a registration that starts near its optimum (a candidate already registered). */
const FINE_STEPS = { initialRotationStep_deg: 1, initialScaleStep: 0.01 } as const;

interface Pair {
  reg: RegistrationResult;
  /** Registered window with its plane removed. */
  window: Float64Array;
  stats: PairStats;
  full: boolean;
}

export async function identify(scStated: Scenario, micrographsStated: readonly PreparedMicrograph[], render: Renderer, opts: IdentifyOptions = {}): Promise<IdentifyResult> {
  const fitSettings = opts.fit === undefined ? DEFAULT_FIT : opts.fit;
  const fitOn = fitSettings !== false && fitSettings.enabled;
  // measured values (a micrograph's w, the thickness under "fit") replace the stated ones everywhere, fitted or not
  const { sc, micrographs } = measuredInputs(scStated, micrographsStated, fitSettings);
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
  // full-size views are asked for more than once (stated values in the ranking, the spread and the checks): rendered once
  const renderFull = cachedRenderer(render);

  // 1. simulations in each micrograph's view (the only work per candidate: shards split it)
  const t0 = performance.now();
  const sims = opts.simulations ?? (await simulateCandidates(sc, micrographs, renderFull, candidates.map((_, k) => k), defectIndex, progress));
  if (sims.length !== candidates.length || sims.some((row) => row.length !== nC)) throw new InternalError('identify: simulations do not match the candidates and micrographs');
  const t1 = performance.now();

  // 2. shift-only registration of everything
  const cors: Correlator[] = micrographs.map((m) => createCorrelator(m.width, m.height, m.width + 2 * m.margin, m.height + 2 * m.margin, 1e-5));
  const tpls: PreparedTemplate[] = micrographs.map((m, i) => cors[i].prepareTemplate(m.contrast));
  // micrographs of one field of view share one registration (identifyMicrographs.ts: viewGroups)
  const groups = viewGroups(micrographs);
  const pairsFor = (k: number, full: boolean, start?: (i: number) => { rotation_deg: number; scale: number }, close = false): Pair[] => {
    const out: Pair[] = new Array(nC);
    const fine = close ? FINE_STEPS : {};
    for (const g of groups) {
      const st = start?.(g[0]);
      const regs = registerGroup(g.map((i) => cors[i]), g.map((i) => tpls[i]), g.map((i) => sims[k][i]), { ...regOpts, ...fine, search: full, ...(st ? { start: st } : {}) });
      g.forEach((i, j) => {
        const m = micrographs[i];
        const reg = regs[j];
        const window = planeRemoved(m, reg);
        out[i] = { reg, window, stats: pairStats(m.contrast, window), full };
      });
    }
    return out;
  };
  progress('registering', 0);
  const pairs: Pair[][] = candidates.map((_, k) => pairsFor(k, false));
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
      pairs[k] = near === undefined ? pairsFor(k, true) : pairsFor(k, true, (i) => viewOf(near, i), true);
    }
    const bestFull = order.find((k) => pairs[k][0].full)!;
    const view = pairs[bestFull].map((p) => ({ rotation_deg: p.reg.rotation_deg, scale: p.reg.scale }));
    const same = applied !== null && view.every((v, i) => v.rotation_deg === applied![i].rotation_deg && v.scale === applied![i].scale);
    if (!same) {
      for (let k = 0; k < candidates.length; k++) if (!pairs[k][0].full) pairs[k] = pairsFor(k, false, (i) => view[i]);
      applied = view;
    }
    order = rank();
    progress('registering', (round + 1) / 4);
  }
  const anchor = order.find((j) => pairs[j][0].full)!;
  for (const k of order.slice(0, top)) if (!pairs[k][0].full) pairs[k] = pairsFor(k, true, (i) => viewOf(anchor, i), true);
  order = rank();
  const t2 = performance.now();

  // 3b. nuisance parameters of the leaders, fitted on small views, checked at full size
  const fits = new Map<number, { report: CandidateFitReport; values: readonly number[]; apply: (v: readonly number[]) => { scenario: Scenario; conditions: readonly Condition[] } }>();
  const simulateWith = (scenario: Scenario, conditions: readonly Condition[], i: number, over: Partial<PreparedMicrograph> = {}) =>
    simulateView(scenario, { ...micrographs[i], condition: conditions[i], ...over }, renderFull, { alongLine: false });
  const registerSim = (i: number, sim: Float64Array, start: { rotation_deg: number; scale: number }, full: boolean): Pair => {
    const m = micrographs[i];
    const reg = register(cors[i], tpls[i], sim, { ...regOpts, ...(full ? FINE_STEPS : {}), search: full, start });
    const window = planeRemoved(m, reg);
    return { reg, window, stats: pairStats(m.contrast, window), full: true };
  };
  if (fitOn) {
    const views = fitViews(micrographs);
    const fitted = order.slice(0, top);
    // the leaders' fits are independent: they run side by side (with workers, their renders share them)
    let fitsDone = 0;
    progress(`fitting thickness, depth, line and w for ${fitted.map((k) => candidates[k].label).join(', ')}`, 0);
    const results = await Promise.all(
      fitted.map(async (k) => {
        const model = nuisanceModel(sc, candidates[k], micrographs, fitSettings);
        const nominalScore = scoreOf(k).score;
        const view = micrographs.map((_, i) => viewOf(k, i));
        const f = await fitCandidate({ model, views, view, linear, spread, render, defectIndex });
        // the fit's values at full size, kept only when they score better there than the stated ones
        const { scenario, conditions } = model.apply(f.values);
        const ps = await Promise.all(micrographs.map(async (_, i) => registerSim(i, await simulateWith(scenario, conditions, i), view[i], true)));
        progress(`fitted thickness, depth, line and w for ${candidates[k].label}`, ++fitsDone / fitted.length);
        return { k, model, nominalScore, f, full: { ps, score: fitAmplitudes(ps.map((p) => p.stats), linear, spread).score } };
      }),
    );
    for (const { k, model, nominalScore, f, full } of results) {
      const nominal = model.parameters.map((p) => p.nominal);
      const base = { ps: pairs[k], score: nominalScore };
      const improved = full.score > base.score;
      const values = improved ? f.values : nominal;
      pairs[k] = improved ? full.ps : base.ps;
      const tilt = model.tilt_deg(values);
      fits.set(k, {
        values,
        apply: model.apply,
        report: {
          parameters: model.parameters.map((p, j) => {
            const span = p.hi - p.lo;
            return { name: p.name, unit: p.unit, nominal: p.nominal, value: values[j], lo: p.lo, hi: p.hi, from: p.from, atLimit: span > 0 && (values[j] - p.lo < 0.02 * span || p.hi - values[j] < 0.02 * span) };
          }),
          ...(tilt === undefined ? {} : { lineTilt_deg: tilt }),
          nominalScore: base.score,
          fittedScore: Math.max(full.score, base.score),
          improved,
          renders: f.renders + nC,
        },
      });
    }
    order = rank();
  }
  const t3 = performance.now();

  // 4. bootstrap of the leaders (the fully registered prefix of the ranking)
  const firstPartial = order.findIndex((k) => !pairs[k][0].full);
  const leaders = order.slice(0, Math.min(top, firstPartial < 0 ? order.length : firstPartial));
  // the renders of steps 5 and 6 do not depend on the bootstrap: asked for now, so that the workers render them while
  // this thread bootstraps (awaited in their steps; a failure is reported there)
  const bestK = order[0];
  const scoreWith = async (k: number, v: readonly number[], fk: { apply: (v: readonly number[]) => { scenario: Scenario; conditions: readonly Condition[] } }) => {
    const { scenario, conditions } = fk.apply(v);
    const ps = await Promise.all(micrographs.map(async (_, i) => registerSim(i, await simulateWith(scenario, conditions, i), viewOf(k, i), false)));
    return fitAmplitudes(ps.map((p) => p.stats), linear, spread).score;
  };
  // the other candidate at the best one's values and the best at the other's (the same parameter names in the same
  // order), for every fitted candidate side by side
  const fbFit = fits.get(bestK);
  const crossedP =
    !fitOn || fbFit === undefined
      ? null
      : Promise.all(
          order.map(async (k, r) => {
            const fk = fits.get(k);
            if (r === 0 || fk === undefined) return null;
            const sK = scoreOf(k).score;
            if (fbFit.values.length !== fk.values.length) return { sK, kAtB: sK, bAtK: scoreOf(bestK).score };
            const [kAtB, bAtK] = await Promise.all([scoreWith(k, fbFit.values, fk), scoreWith(bestK, fk.values, fbFit)]);
            return { sK, kAtB, bAtK };
          }),
        );
  // g reversed or the image mirrored on one micrograph: every leading candidate at its own parameters, that
  // micrograph replaced by the variant (step 6)
  const stateOf = (k: number) => {
    const f = fits.get(k);
    return f ? f.apply(f.values) : { scenario: variantScenario(sc, candidates[k]), conditions: micrographs.map((m) => m.condition) };
  };
  const variantsP = Promise.all(
    leaders.map((k) => {
      const st = stateOf(k);
      return Promise.all(
        micrographs.map(async (m, i) => {
          const c = st.conditions[i];
          const reversed: Condition = { ...c, g: [-c.g[0], -c.g[1], -c.g[2]] };
          // rendered along the line where possible (three times faster; slightly blurrier, which only makes the check
          // more cautious) and registered by shift only, at the micrograph's rotation (mirrored: its negative) and scale
          const v = viewOf(k, i);
          const [simRev, simMir] = await Promise.all([
            simulateView(st.scenario, { ...m, condition: reversed }, renderFull, { defectIndex }),
            simulateView(st.scenario, { ...m, condition: c, settings: { ...m.settings, mirrored: !m.settings.mirrored } }, renderFull, { defectIndex }),
          ]);
          return [registerSim(i, simRev, v, false), registerSim(i, simMir, { rotation_deg: -v.rotation_deg, scale: v.scale }, false)] as const;
        }),
      );
    }),
  );
  for (const pr of [crossedP, variantsP]) pr?.catch(() => undefined);
  const tb = performance.now();
  const replicates = bootstrap(micrographs, cors, pairs, leaders, linear, spread, B, seed, (f) => progress('estimating the noise of the scores', f));
  const t4 = performance.now();

  // 5. spread of the gaps across the parameter ranges (fitted leaders), and the gain unfitted candidates might get
  const spreads = order.map(() => 0);
  if (crossedP !== null) {
    progress('spread of the scores across the parameter ranges', 0);
    const sB = scoreOf(bestK).score;
    let maxSpread = 0;
    let maxGain = 0;
    for (const f of fits.values()) maxGain = Math.max(maxGain, f.report.fittedScore - f.report.nominalScore);
    const crossed = await crossedP;
    for (let r = 1; r < order.length; r++) {
      const c = crossed[r];
      if (c === null) continue;
      const { sK, kAtB, bAtK } = c;
      const gaps = [sB - sK, sB - kAtB, bAtK - sK];
      spreads[r] = 0.5 * (Math.max(...gaps) - Math.min(...gaps));
      maxSpread = Math.max(maxSpread, spreads[r]);
    }
    for (let r = 1; r < order.length; r++) if (!fits.has(order[r])) spreads[r] = maxSpread + maxGain;
  }

  const labels = order.map((k) => candidates[k].label);
  const fitsOfOrder = order.map((k) => scoreOf(k));
  const verdict0 = decide(labels, fitsOfOrder.map((f) => f.score), replicates, sigmas, undefined, fitOn ? { spreads, fitted: true } : undefined);
  const lattice = sc.material.lattice;
  const ranking: RankedCandidate[] = order.map((k, r) => ({
    candidate: candidates[k].label,
    kind: candidates[k].kind,
    score: fitsOfOrder[r].score,
    amplitude: fitsOfOrder[r].amplitude,
    fullySearched: pairs[k][0].full,
    ...(fits.has(k) ? { fit: fits.get(k)!.report } : {}),
    perCondition: micrographs.map((m, i) => {
      const p = pairs[k][i];
      return {
        condition: m.conditionId,
        r2: fitsOfOrder[r].perCondition[i].r2,
        ncc: p.reg.ncc,
        amplitude: fitsOfOrder[r].perCondition[i].amplitude,
        shift_nm: [p.reg.shiftX_px * m.pixel_nm, p.reg.shiftY_px * m.pixel_nm] as const,
        rotation_deg: p.reg.rotation_deg,
        scale: p.reg.scale,
        visibility: visibilityNote(lattice, candidates[k], m.condition),
      };
    }),
  }));

  // 6. absolute fit and consistency checks of the best candidate
  progress('checking the best candidate', 0);
  const bestFit = fitsOfOrder[0];
  const absolute = absoluteFit(micrographs, pairs[bestK].map((p) => p.window), bestFit.perCondition.map((p) => p.amplitude));
  const flags: ConsistencyFlag[] = [];
  const consistency: { condition: string; scoreStated: number; scoreReversed: number; scoreMirrored: number }[] = [];
  const bestState = stateOf(bestK);
  const maxR = regOpts.maxRotation_deg ?? DEFAULT_MAX_ROTATION_DEG;
  const maxS = regOpts.maxScale ?? DEFAULT_MAX_SCALE;
  // g reversed or the image mirrored on one micrograph: flagged when the best such score beats the best score as stated
  const flipMargin = Math.max(3 * verdict0.gapSigma, FLIP_MARGIN / nC);
  const alt = micrographs.map(() => ({ reversed: { score: -Infinity, k: bestK, r2: 0 }, mirrored: { score: -Infinity, k: bestK, r2: 0 } }));
  // every leader's variants (rendered side by side), compared in the leaders' order (ties keep the first)
  const variants = await variantsP;
  leaders.forEach((k, j) => {
    const base = pairs[k].map((p) => p.stats);
    for (let i = 0; i < nC; i++) {
      const m = micrographs[i];
      const [rev, mir] = variants[j][i];
      for (const [kind, pr] of [['reversed', rev], ['mirrored', mir]] as const) {
        const score = fitAmplitudes(base.map((x, j) => (j === i ? pr.stats : x)), linear, spread).score;
        if (score > alt[i][kind].score) alt[i][kind] = { score, k, r2: freeR2(m.contrast, pr.window) };
      }
    }
  });
  const bestScore = fitsOfOrder[0].score;
  for (let i = 0; i < nC; i++) {
    const m = micrographs[i];
    const fr = flipFlag(m, 'g reversed', bestScore, alt[i].reversed.score, candidates[alt[i].reversed.k].label, flipMargin);
    if (fr) flags.push(fr);
    const fm = flipFlag(m, 'mirrored', bestScore, alt[i].mirrored.score, candidates[alt[i].mirrored.k].label, flipMargin);
    if (fm) flags.push(fm);
    consistency.push({ condition: m.conditionId, scoreStated: bestScore, scoreReversed: alt[i].reversed.score, scoreMirrored: alt[i].mirrored.score });
  }
  // registration at a limit: compare with the best registration inside 80 % of the ranges
  const atLimit = micrographs.map((_, i) => {
    const reg = pairs[bestK][i].reg;
    return { rotAt: Math.abs(reg.rotation_deg) >= maxR - 1e-6, scaleAt: Math.abs(reg.scale - 1) >= maxS - 1e-6 };
  });
  const limitSims = await Promise.all(
    micrographs.map((_, i) => (!atLimit[i].rotAt && !atLimit[i].scaleAt ? null : fbFit ? simulateWith(bestState.scenario, bestState.conditions, i) : sims[bestK][i])),
  );
  for (let i = 0; i < nC; i++) {
    const m = micrographs[i];
    const reg = pairs[bestK][i].reg;
    const { rotAt, scaleAt } = atLimit[i];
    const sim = limitSims[i];
    if (sim !== null) {
      const inner = { maxRotation_deg: 0.8 * maxR, maxScale: 0.8 * maxS };
      const start = { rotation_deg: Math.max(-inner.maxRotation_deg, Math.min(inner.maxRotation_deg, reg.rotation_deg)), scale: Math.max(1 - inner.maxScale, Math.min(1 + inner.maxScale, reg.scale)) };
      const r2 = register(cors[i], tpls[i], sim, { ...regOpts, ...inner, start, ...FINE_STEPS });
      const w = planeRemoved(m, r2);
      const what = rotAt && scaleAt ? `rotation (${maxR} degrees) and scale (${100 * maxS} %)` : rotAt ? `rotation (${maxR} degrees)` : `scale (${100 * maxS} %)`;
      const fe = edgeFlag(m, m.contrast, pairs[bestK][i].window, w, bestFit.perCondition[i].amplitude, absolute.perMicrograph[i].sigma, what);
      if (fe) flags.push(fe);
    }
  }
  const atRangeLimit = fbFit ? fbFit.report.parameters.filter((p) => p.atLimit).map((p) => p.name) : [];
  const verdict = finalVerdict(verdict0, absolute, flags, atRangeLimit);
  const t5 = performance.now();
  return {
    scenario: sc.name,
    elasticity: describeElasticity(sc).text,
    surfaces: describeSurfaces(sc).text,
    defectIndex,
    defectLabel: sc.defects[defectIndex].label,
    micrographs,
    ranking,
    candidates: order.map((k) => candidates[k]),
    verdict,
    leaderImages: order.slice(0, top).map((k) => pairs[k].map((p) => p.reg.window)),
    settings: { top, bootstrap: B, seed, sigmas, amplitudeSpread: spread, fit: fitOn ? fitSettings : false },
    absolute,
    flags,
    consistency,
    seconds: { render: (t1 - t0) / 1000, register: (t2 - t1) / 1000, fit: (t3 - t2) / 1000, bootstrap: (t4 - tb) / 1000, checks: (tb - t3 + t5 - t4) / 1000 },
  };
}

/**
 * Step 1 of identify for the candidates with the given indices (into
 * identificationCandidates(sc, defectIndex)): their simulations in every
 * micrograph's view, [candidate][micrograph]. A shard of a cluster run calls
 * it for its share of the candidates; identify for all of them.
 */
export async function simulateCandidates(
  sc: Scenario,
  micrographs: readonly PreparedMicrograph[],
  render: Renderer,
  indices: readonly number[],
  defectIndex = 0,
  progress: (message: string, fraction: number) => void = () => undefined,
): Promise<Float64Array[][]> {
  const candidates = identificationCandidates(sc, defectIndex);
  // all requested side by side: with workers, one view's post-processing overlaps the next ones' rendering
  let done = 0;
  const total = indices.length * micrographs.length;
  progress(`simulating ${indices.length} candidate(s) under ${micrographs.length} micrograph(s)`, 0);
  return Promise.all(
    indices.map((k) => {
      const cand = candidates[k];
      const vsc = variantScenario(sc, cand);
      return Promise.all(
        micrographs.map(async (m) => {
          const sim = await simulateView(vsc, m, render, { alongLine: false });
          progress(`simulated ${cand.label} under ${m.conditionId}`, ++done / total);
          return sim;
        }),
      );
    }),
  );
}
/**
 * The scenario and micrographs with measured values in place of the stated
 * ones: the foil thickness, and each micrograph's w (its condition then gives
 * the deviation as w; the resolved parameters are recomputed).
 */
export function measuredInputs(sc: Scenario, micrographs: readonly PreparedMicrograph[], fit: FitSettings | false): { sc: Scenario; micrographs: PreparedMicrograph[] } {
  const thickness_nm = fit === false ? undefined : fit.thickness_nm;
  const sc1 = thickness_nm === undefined ? sc : { ...sc, thickness_nm };
  const ms = micrographs.map((m) => {
    const w = m.settings.w;
    if (w === undefined && sc1 === sc) return m;
    const condition: Condition = w === undefined ? m.condition : { ...m.condition, deviation: { kind: 'w', w } };
    return { ...m, condition, resolved: resolveCondition(sc1, condition) };
  });
  return { sc: sc1, micrographs: ms };
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
