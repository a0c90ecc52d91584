/** The visibility table of a scenario: every defect and candidate under every condition. */
import type { Vec3 } from '../math/vec3.js';
import type { Scenario } from '../scenario/types.js';
import { judge, type VisibilityEntry } from './visibility.js';

export interface VisibilityRow {
  readonly subject: string;
  readonly kind: 'defect' | 'candidate';
  readonly b: Vec3;
  readonly line?: Vec3;
  readonly entries: readonly (VisibilityEntry & { readonly condition: string; readonly g: Vec3 })[];
}

export function visibilityTable(sc: Scenario): VisibilityRow[] {
  const rows: VisibilityRow[] = [];
  const l = sc.material.lattice;
  const make = (subject: string, kind: 'defect' | 'candidate', b: Vec3, line?: Vec3): VisibilityRow => ({
    subject,
    kind,
    b,
    ...(line ? { line } : {}),
    entries: sc.conditions.map((c) => ({ condition: c.id, g: c.g, ...judge(l, c.g, b, line) })),
  });
  for (const d of sc.defects) rows.push(make(d.label, 'defect', d.b, d.line));
  const soleLine = sc.defects.length === 1 ? sc.defects[0].line : undefined;
  for (const c of sc.candidates) rows.push(make(c.label, 'candidate', c.b, c.line ?? soleLine));
  return rows;
}
