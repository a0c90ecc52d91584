/**
 * Planning a g.b series: the reachable two-beam conditions, how well each
 * separates the candidates in simulation, the smallest set that identifies
 * the Burgers vector and its sign, and the order with least tilting.
 */
import type { Vec3 } from '../math/vec3.js';
import { cartesianToDirection } from '../crystal/lattice.js';
import { identificationCandidates, type Candidate } from '../analysis/candidates.js';
import { judge } from '../analysis/visibility.js';
import type { Condition, Scenario } from '../scenario/types.js';
import { InputError } from '../errors.js';
import { type Holder, type Orientation, type Tilts, beamAtTilts, tiltBetween_deg } from './holder.js';
import { reachableConditions, reachableZones, type ReachableCondition, type ReachableZone } from './reachable.js';
import { candidateStrips, DEFAULT_STRIP, separatedPairs, type StripOptions } from './separation.js';
import { exactCover, greedyCover, leastTiltOrder } from './chooseSet.js';

export interface PlanOptions {
  readonly holder: Holder;
  readonly orientation: Orientation;
  readonly current: Tilts;
  readonly gMax_per_nm: number;
  readonly zoneIndexMax: number;
  readonly offZone_deg: number;
  /** w = s xi_g of every planned condition. */
  readonly w: number;
  readonly defectIndex: number;
  readonly strip: StripOptions;
  /** Largest set size for the exhaustive check (0: skip it). */
  readonly exactUpTo: number;
}

export interface ScoredCondition extends ReachableCondition {
  readonly id: string;
  readonly condition: Condition;
  /** Number of candidate pairs this condition tells apart (of nPairs). */
  readonly pairsSeparated: number;
  /** Candidates (by index) that no other candidate is confused with under this condition alone. */
  readonly uniquelyIdentified: number;
  /** g.b of every candidate (same order as PlanResult.candidates). */
  readonly gb: readonly number[];
  /** Pairs separated, as bits over the pair list. */
  readonly separates: Uint8Array;
  readonly endOn: boolean;
}

export interface PlanStep {
  readonly condition: ScoredCondition;
  /** Tilt from the previous step (or the current orientation), degrees. */
  readonly tilt_deg: number;
}

export interface PlanResult {
  readonly candidates: readonly Candidate[];
  readonly nPairs: number;
  readonly zones: readonly ReachableZone[];
  readonly conditions: readonly ScoredCondition[];
  readonly steps: readonly PlanStep[];
  readonly complete: boolean;
  /** Candidate pairs no reachable condition separates: labels. */
  readonly unseparated: readonly (readonly [string, string])[];
  /** Size of the smallest complete set found by exhaustive search (when run), else undefined. */
  readonly exactSize?: number;
  readonly totalTilt_deg: number;
  readonly currentBeam_cart: Vec3;
}

/** Condition ids like "g1m11" (m for minus). */
export function conditionId(g: Vec3): string {
  return 'g' + g.map((x) => (x < 0 ? `m${-x}` : `${x}`)).join('');
}

export function plan(sc: Scenario, opt: PlanOptions): PlanResult {
  const candidates = identificationCandidates(sc, opt.defectIndex);
  if (candidates[0].kind !== 'burgers') {
    throw new InputError(`defects[${opt.defectIndex}] is not a dislocation; the plan command chooses reflections to identify a Burgers vector, so point --defect at a dislocation`);
  }
  const n = candidates.length;
  const nPairs = (n * (n - 1)) / 2;
  const reach = reachableConditions(sc.material, opt.orientation, opt.holder, opt.current, {
    gMax_per_nm: opt.gMax_per_nm,
    zoneIndexMax: opt.zoneIndexMax,
    offZone_deg: opt.offZone_deg,
    kV: sc.kV,
    absorption: sc.absorption,
  });
  if (reach.length === 0) {
    throw new InputError(`no reflection up to |g| = ${opt.gMax_per_nm} nm^-1 can be set up within the tilt ranges; raise --g-max or --zone-index, or widen the tilt ranges`);
  }
  const l = sc.material.lattice;
  const conditions: ScoredCondition[] = reach.map((r) => {
    const beam = cartesianToDirection(l, r.beam_cart);
    const condition: Condition = { id: conditionId(r.g), g: r.g, deviation: { kind: 'w', w: opt.w }, beam, beams: { kind: 'two' } };
    const strip = candidateStrips(sc, candidates, condition, opt.strip);
    const separates = separatedPairs(strip, n, opt.strip.minDifference);
    let pairs = 0;
    for (const b of separates) pairs += b;
    let unique = 0;
    for (let i = 0; i < n; i++) {
      let alone = true;
      for (let j = 0; j < n; j++) if (j !== i && strip.difference[i * n + j] < opt.strip.minDifference) alone = false;
      if (alone) unique++;
    }
    const gb = candidates.map((c) => judge(l, r.g, c.b!, c.line).gb);
    return { ...r, id: condition.id, condition, pairsSeparated: pairs, uniquelyIdentified: unique, gb, separates, endOn: strip.endOn };
  });
  const cost = conditions.map((c) => c.fromCurrent_deg);
  const cover = greedyCover(conditions.map((c) => c.separates), cost);
  let exactSize: number | undefined;
  let pick = cover.chosen;
  if (opt.exactUpTo > 0 && cover.complete) {
    const e = exactCover(conditions.map((c) => c.separates), Math.min(opt.exactUpTo, cover.chosen.length));
    exactSize = e?.length;
    // greedy set cover is not always optimal: take the exhaustive answer when it is smaller
    if (e !== undefined && e.length < pick.length) pick = e;
  }
  const here = beamAtTilts(opt.orientation, opt.holder.kind, opt.current);
  const chosen = pick.map((i) => conditions[i]);
  const dist = (a: number, b: number) => tiltBetween_deg(a < 0 ? here : chosen[a].beam_cart, chosen[b].beam_cart);
  const order = leastTiltOrder(chosen.length, dist);
  let prev = -1;
  let total = 0;
  const steps = order.map((i) => {
    const d = dist(prev, i);
    total += d;
    prev = i;
    return { condition: chosen[i], tilt_deg: d };
  });
  const pairLabels: [string, string][] = [];
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) pairLabels.push([candidates[i].label, candidates[j].label]);
  return {
    candidates,
    nPairs,
    zones: reachableZones(sc.material, opt.orientation, opt.holder, opt.current, opt.zoneIndexMax),
    conditions,
    steps,
    complete: cover.complete,
    unseparated: cover.unseparated.map((p) => pairLabels[p]),
    ...(exactSize === undefined ? {} : { exactSize }),
    totalTilt_deg: total,
    currentBeam_cart: here,
  };
}

/** Default planning options that do not depend on the holder. */
export const PLAN_DEFAULTS = { gMax_per_nm: 8, zoneIndexMax: 3, offZone_deg: 5, w: 1, strip: DEFAULT_STRIP, exactUpTo: 4 };
