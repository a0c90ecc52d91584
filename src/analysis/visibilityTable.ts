/** The visibility table of a scenario: every defect and candidate under every condition. */
import type { Vec3 } from '../math/vec3.js';
import type { Scenario } from '../scenario/types.js';
import { judge, type VisibilityEntry } from './visibility.js';
import { dissociationPair } from '../imaging/fieldSpecs.js';

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
  const lines: Vec3[] = [];
  for (const d of sc.defects) {
    if (d.type === 'dislocation' || d.type === 'partial') {
      rows.push(make(d.label, 'defect', d.b, d.line));
      lines.push(d.line);
    } else if (d.type === 'dissociated') {
      rows.push(make(`${d.label} (perfect b)`, 'defect', d.b, d.line));
      const pair = dissociationPair(sc.material, d);
      rows.push(make(`${d.label}, partial 1`, 'defect', pair.b1, d.line));
      rows.push(make(`${d.label}, partial 2`, 'defect', pair.b2, d.line));
      lines.push(d.line);
    }
  }
  const soleLine = lines.length === 1 ? lines[0] : undefined;
  for (const c of sc.candidates) rows.push(make(c.label, 'candidate', c.b, c.line ?? soleLine));
  return rows;
}
