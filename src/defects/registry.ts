/**
 * The defect types thinfoil knows, in the order the scenario parser names
 * them. A new type is its module (src/defects/<type>.ts) plus one line here.
 */
import type { DefectType } from './defectType.js';
import { dislocation, type DislocationSpec } from './dislocation.js';
import { partial, type PartialSpec } from './partial.js';
import { dissociated, type DissociatedSpec } from './dissociated.js';
import { fault, type FaultSpec } from './fault.js';
import { inclusion, type InclusionSpec } from './inclusion.js';
import { loop, type LoopSpec } from './loop.js';

/** A validated scenario defect: one spec per type. */
export type DefectSpec = DislocationSpec | PartialSpec | DissociatedSpec | FaultSpec | InclusionSpec | LoopSpec;

type AnyDefectType = { [T in DefectSpec['type']]: DefectType<Extract<DefectSpec, { type: T }>> }[DefectSpec['type']];

let table: Map<string, AnyDefectType> | undefined;

/** Built on first use, so that the modules may import the parser's readers without an import-order trap. */
function types(): Map<string, AnyDefectType> {
  table ??= new Map<string, AnyDefectType>([dislocation, partial, dissociated, fault, inclusion, loop].map((t) => [t.type, t]));
  return table;
}

/** The "type" strings of all defect types, in registry order. */
export function defectTypeNames(): string[] {
  return [...types().keys()];
}

/** The module of a type string, or undefined for an unknown one. */
export function defectTypeNamed(name: string): DefectType | undefined {
  return types().get(name) as DefectType | undefined;
}

/** The module of a validated defect. */
export function defectTypeOf<S extends DefectSpec>(d: S): DefectType<S> {
  const t = types().get(d.type);
  if (t === undefined) throw new Error(`defect type "${d.type}" is not registered in src/defects/registry.ts`);
  return t as unknown as DefectType<S>;
}
