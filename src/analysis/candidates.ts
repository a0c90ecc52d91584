/**
 * Identification candidates: each is one hypothesis about the target defect
 * (by default the scenario's first defect), given as the defect that replaces
 * it. variantScenario(sc, candidate) is the scenario with that replacement
 * (an immutable copy).
 *
 * Kinds, chosen by the target's type:
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
import { dot } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import { InputError } from '../errors.js';
import { formatVector } from '../scenario/parse.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';
import { judge } from './visibility.js';

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
  switch (target.type) {
    case 'dislocation':
    case 'partial':
      return burgersCandidates(sc, defectIndex, () => true);
    case 'dissociated': {
      const plane = target.plane;
      return burgersCandidates(sc, defectIndex, (b) => Math.abs(dot(plane, b)) < 1e-9);
    }
    case 'fault':
      return faultCandidates(target, defectIndex);
    case 'inclusion':
      return misfitCandidates(target, defectIndex);
    default: {
      // a defect type added later needs its own candidate kind here
      const t = (target as { type: string }).type;
      throw new InputError(`defects[${defectIndex}] is a "${t}", for which identification has no candidates yet; choose another defect with --defect`);
    }
  }
}

function burgersCandidates(sc: Scenario, defectIndex: number, keep: (b: Vec3) => boolean): Candidate[] {
  const target = sc.defects[defectIndex];
  if (!('b' in target) || !('line' in target)) throw new RangeError('burgersCandidates: target has no Burgers vector');
  if (sc.candidates.length === 0) {
    throw new InputError('candidates is empty; list the Burgers vectors to compare, e.g. "candidates": ["1/2<110>"]');
  }
  const out: Candidate[] = [];
  const seen = new Set<string>();
  for (const spec of sc.candidates) {
    for (const sign of [1, -1]) {
      const b: Vec3 = [sign * spec.b[0] + 0, sign * spec.b[1] + 0, sign * spec.b[2] + 0];
      if (!keep(b)) continue;
      const line = spec.line ?? target.line;
      const key = `${formatVector(b)} ${formatVector(line)}`;
      if (seen.has(key)) continue;
      seen.add(key);
      const label = spec.line === undefined ? `b = ${formatBurgers(b)}` : `b = ${formatBurgers(b)}, u = ${formatVector(line)}`;
      out.push({ label, kind: 'burgers', defectIndex, defect: { ...target, b, line }, b, line });
    }
  }
  if (out.length === 0) {
    throw new InputError(`candidates holds no Burgers vector that fits defects[${defectIndex}] (a dissociated dislocation needs b in its glide plane); add suitable candidates`);
  }
  return out;
}

function faultCandidates(target: Extract<DefectSpec, { type: 'fault' }>, defectIndex: number): Candidate[] {
  const v = target.vector;
  const minus: Vec3 = [-v[0] + 0, -v[1] + 0, -v[2] + 0];
  const name = (nature: string, r: Vec3) => (nature === 'vector' ? `R = ${formatBurgers(r)}` : `${nature} (R = ${formatBurgers(r)})`);
  const other = target.nature === 'intrinsic' ? 'extrinsic' : target.nature === 'extrinsic' ? 'intrinsic' : 'vector';
  return [
    { label: name(target.nature, v), kind: 'faultNature', defectIndex, defect: target, faultVector: v },
    { label: name(other, minus), kind: 'faultNature', defectIndex, defect: { ...target, vector: minus, nature: other }, faultVector: minus },
  ];
}

function misfitCandidates(target: Extract<DefectSpec, { type: 'inclusion' }>, defectIndex: number): Candidate[] {
  const flip = (d: typeof target): typeof target => (d.misfit === undefined ? { ...d, strain: -d.strain } : { ...d, strain: -d.strain, misfit: -d.misfit });
  const name = (d: typeof target) => (d.misfit === undefined ? `strain ${signed(d.strain)}` : `misfit ${signed(d.misfit)}`);
  const positive = target.strain >= 0 ? target : flip(target);
  const negative = flip(positive);
  return [positive, negative].map((d) => ({ label: name(d), kind: 'misfitSign' as const, defectIndex, defect: d, strain: d.strain }));
}

function signed(x: number): string {
  return `${x >= 0 ? '+' : '-'}${Number(Math.abs(x).toPrecision(3))}`;
}

/** "1/2[1 1 0]" style for vectors whose entries share a simple fraction; else formatVector. */
export function formatBurgers(v: Vec3): string {
  for (const d of [1, 2, 3, 6, 4, 5, 8, 10, 12]) {
    const k = v.map((x) => x * d);
    if (k.every((x) => Math.abs(x - Math.round(x)) < 1e-6)) {
      const ints = k.map((x) => Math.round(x) + 0);
      return d === 1 ? `[${ints.join(' ')}]` : `1/${d}[${ints.join(' ')}]`;
    }
  }
  return formatVector(v);
}

export interface VisibilityNote {
  /** "g.b" for Burgers vectors, "g.R" for faults, "" when no such rule applies. */
  readonly quantity: 'g.b' | 'g.R' | '';
  readonly value?: number;
  readonly gbxu?: number;
  readonly verdict?: string;
  readonly rule?: string;
}

/** The g.b (or g.R) entry of one candidate under one condition, with the rule of thumb's verdict. */
export function visibilityNote(lattice: Lattice, c: Candidate, cond: Condition): VisibilityNote {
  if (c.kind === 'burgers' && c.b !== undefined) {
    const j = judge(lattice, cond.g, c.b, c.line);
    return { quantity: 'g.b', value: j.gb, ...(j.gbxu === undefined ? {} : { gbxu: j.gbxu }), verdict: j.verdict, rule: j.rule };
  }
  if (c.kind === 'faultNature' && c.faultVector !== undefined) {
    const gr = Math.round(dot(cond.g, c.faultVector) * 1e9) / 1e9 + 0;
    const frac = gr - Math.floor(gr);
    const invisible = frac < 1e-9 || frac > 1 - 1e-9;
    return {
      quantity: 'g.R',
      value: gr,
      verdict: invisible ? 'invisible' : 'visible',
      rule: invisible ? 'g.R integer: alpha = 2 pi g.R = 0 mod 2 pi' : `alpha = 2 pi g.R = ${Number((((frac * 360 + 180) % 360) - 180).toFixed(1))} degrees (mod 360)`,
    };
  }
  return { quantity: '' };
}
