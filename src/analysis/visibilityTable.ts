/**
 * The visibility table of a scenario: every defect and candidate under every
 * condition. Each entry carries the g.b / g.(b x u) rule of thumb (visibility.ts)
 * and, where the line direction is known, the verdict of a simulated strip of
 * columns across the line (for a loop: a patch of columns over it;
 * lineContrast.ts); the simulated verdict is the one the table shows, the rule
 * stands beside it. With relaxed foil surfaces every simulated entry also carries
 * the same strip or patch in the infinite medium: the two half-space corrections
 * of an inclined line are approximate away from where it meets the surfaces
 * (README, Foil surfaces), and a verdict that only the corrections change (a
 * g.b = 0 screw, say) must be seen as such.
 */
import type { Vec3 } from '../math/vec3.js';
import type { DefectSpec, Scenario } from '../scenario/types.js';
import { defectTypeOf } from '../defects/registry.js';
import { judge, type Verdict, type VisibilityEntry } from './visibility.js';
import { defectModel, type DefectModel, type DislocationFieldSpec, type LoopFieldSpec } from '../imaging/fieldSpecs.js';
import { resolveCondition, type ResolvedCondition } from '../imaging/resolveCondition.js';
import { lineContrast, loopContrast, type LineContrast, type SimulatedVerdict } from './lineContrast.js';

export interface VisibilityTableEntry extends Omit<VisibilityEntry, 'verdict'> {
  readonly condition: string;
  readonly g: Vec3;
  /** The verdict of the g.b / g.(b x u) rule alone. */
  readonly ruleVerdict: Verdict;
  /** The simulated verdict when a line could be simulated, else the rule's verdict. */
  readonly verdict: SimulatedVerdict | Verdict;
  /** The simulated strip across the line, or patch over a loop (absent when nothing could be simulated: a candidate without a line direction). */
  readonly simulated?: LineContrast;
  /** With relaxed surfaces: the same simulation in the infinite medium ("surfaces": "infinite"). */
  readonly infiniteMedium?: LineContrast;
}

export interface VisibilityRow {
  readonly subject: string;
  readonly kind: 'defect' | 'candidate';
  readonly b: Vec3;
  readonly line?: Vec3;
  readonly entries: readonly VisibilityTableEntry[];
}

/** What to simulate for a row: a defect model and the line of it (strip across it) or the loop of it (patch over it) whose contrast is measured. */
export type Simulation = { readonly model: DefectModel; readonly line: DislocationFieldSpec } | { readonly model: DefectModel; readonly loop: LoopFieldSpec };

/** The defect model of one defect alone. */
export function modelOf(sc: Scenario, d: DefectSpec): DefectModel {
  return defectModel({ ...sc, defects: [d] });
}

/** The model restricted to field/surface k (a dislocation's field and its cut come in the same order). */
export function only(m: DefectModel, k: number): Simulation {
  return { model: { fields: [m.fields[k]], surfaces: [m.surfaces[k]] }, line: m.fields[k] as DislocationFieldSpec };
}

export function visibilityTable(sc: Scenario, options: { simulate?: boolean } = {}): VisibilityRow[] {
  const rows = tableOf(sc, options.simulate ?? true);
  if (sc.surfaces !== 'relaxed' || options.simulate === false) return rows;
  const inf = tableOf({ ...sc, surfaces: 'infinite' }, true);
  return rows.map((r, i) => ({
    ...r,
    entries: r.entries.map((e, j) => {
      const s = inf[i].entries[j].simulated;
      return s === undefined ? e : { ...e, infiniteMedium: s };
    }),
  }));
}

function tableOf(sc: Scenario, simulate: boolean): VisibilityRow[] {
  const rows: VisibilityRow[] = [];
  const l = sc.material.lattice;
  const conditions: ResolvedCondition[] = simulate ? sc.conditions.map((c) => resolveCondition(sc, c)) : [];
  const make = (subject: string, kind: 'defect' | 'candidate', b: Vec3, line: Vec3 | undefined, sim: (() => Simulation) | undefined): VisibilityRow => {
    const s = simulate && sim !== undefined ? sim() : undefined;
    return {
      subject,
      kind,
      b,
      ...(line ? { line } : {}),
      entries: sc.conditions.map((c, i) => {
        const rule = judge(l, c.g, b, line);
        const simulated = s === undefined ? undefined : 'line' in s ? lineContrast(conditions[i], s.model, s.line) : loopContrast(conditions[i], s.model, s.loop);
        return { condition: c.id, g: c.g, ...rule, ruleVerdict: rule.verdict, verdict: simulated?.verdict ?? rule.verdict, ...(simulated ? { simulated } : {}) };
      }),
    };
  };
  const lines: Vec3[] = [];
  for (const d of sc.defects) {
    const t = defectTypeOf(d);
    const own = t.visibilityRows(sc, d, (subject, b, line, sim) => make(subject, 'defect', b, line, sim));
    rows.push(...own);
    const line = t.line(d);
    if (own.length > 0 && line !== undefined) lines.push(line);
  }
  const soleLine = lines.length === 1 ? lines[0] : undefined;
  const mid = sc.thickness_nm / 2;
  // without a line, a scenario whose one loop is the target: candidates are simulated as that loop with their b
  const loops = sc.defects.filter((d) => d.type === 'loop');
  const soleLoop = lines.length === 0 && loops.length === 1 ? loops[0] : undefined;
  for (const c of sc.candidates) {
    const line = c.line ?? soleLine;
    // a candidate is simulated as a straight dislocation through the image centre at mid-depth
    let sim: (() => Simulation) | undefined =
      line === undefined ? undefined : () => only(modelOf(sc, { type: 'dislocation', label: c.label, b: c.b, line, point_nm: [0, 0, mid] }), 0);
    if (line === undefined && soleLoop !== undefined) {
      // the loop's shape, place and plane; a b that is no lattice translation encloses a fault of fault vector b
      const { fault: _fault, ...shape } = soleLoop;
      sim = () => {
        const model = modelOf(sc, { ...shape, label: c.label, b: c.b });
        return { model, loop: model.fields[0] as LoopFieldSpec };
      };
    }
    rows.push(make(c.label, 'candidate', c.b, line, sim));
  }
  return rows;
}
