/**
 * Identification candidates: each is one hypothesis about the target defect
 * (by default the scenario's first defect), given as the defect that replaces
 * it. variantScenario(sc, candidate) is the scenario with that replacement
 * (an immutable copy).
 *
 * Each defect type makes its own candidates (src/defects/<type>.ts); the kinds:
 *  - "burgers" (dislocation, partial, dissociated): every Burgers vector of
 *    the scenario's "candidates" list with BOTH signs: b and -b are different
 *    hypotheses, because the image moves to the other side of the core
 *    (Hirsch et al. 1965). A dissociated dislocation keeps only the b lying
 *    in its glide plane.
 *  - "faultNature" (fault): the given fault vector and its negative, i.e.
 *    intrinsic versus extrinsic for a {111} fault in fcc.
 *  - "misfitSign" (inclusion): the given constrained strain and its negative.
 */
import type { Vec3 } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import { InputError } from '../errors.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';
import { defectTypeOf } from '../defects/registry.js';

export type CandidateKind = 'burgers' | 'faultNature' | 'misfitSign';

export interface Candidate {
  readonly label: string;
  readonly kind: CandidateKind;
  /** Index of the target defect in sc.defects. */
  readonly defectIndex: number;
  /** The defect that replaces the target. */
  readonly defect: DefectSpec;
  /** Burgers vector (kind "burgers"), lattice units. */
  readonly b?: Vec3;
  /** Line direction used (kind "burgers"). */
  readonly line?: Vec3;
  /** Fault vector (kind "faultNature"). */
  readonly faultVector?: Vec3;
  /** Constrained strain (kind "misfitSign"). */
  readonly strain?: number;
}

/** The scenario with the candidate's defect in place of the target. */
export function variantScenario(sc: Scenario, c: Candidate): Scenario {
  return { ...sc, defects: sc.defects.map((d, i) => (i === c.defectIndex ? c.defect : d)) };
}

/** All candidates for the target defect. */
export function identificationCandidates(sc: Scenario, defectIndex = 0): Candidate[] {
  if (sc.defects.length === 0) throw new InputError('defects is empty; identification needs the defect to identify (its line, position and depth) in "defects"');
  if (!(Number.isInteger(defectIndex) && defectIndex >= 0 && defectIndex < sc.defects.length)) {
    throw new InputError(`--defect ${defectIndex} names no defect; the scenario has defects 0..${sc.defects.length - 1}`);
  }
  const target = sc.defects[defectIndex];
  const t = defectTypeOf(target);
  if (t.candidates === undefined) {
    throw new InputError(`defects[${defectIndex}] is a "${target.type}", for which identification has no candidates yet; choose another defect with --defect`);
  }
  return t.candidates(sc, target, defectIndex);
}

export interface VisibilityNote {
  /** "g.b" for Burgers vectors, "g.R" for faults, "" when no such rule applies. */
  readonly quantity: 'g.b' | 'g.R' | '';
  readonly value?: number;
  readonly gbxu?: number;
  readonly verdict?: string;
  readonly rule?: string;
}

/** The g.b (or g.R) entry of one candidate under one condition, with the rule of thumb's verdict (from the candidate's defect type). */
export function visibilityNote(lattice: Lattice, c: Candidate, cond: Condition): VisibilityNote {
  return defectTypeOf(c.defect).visibilityNote(lattice, c, cond);
}
