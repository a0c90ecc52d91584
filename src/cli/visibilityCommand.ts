/** `thinfoil visibility <scenario>`: the g.b table with verdicts. */
import type { Scenario } from '../scenario/types.js';
import { visibilityTable, type VisibilityRow, type VisibilityTableEntry } from '../analysis/visibilityTable.js';
import { VISIBLE_CONTRAST, WEAK_CONTRAST } from '../analysis/lineContrast.js';
import { formatDirectionIn, formatPlaneIn } from '../crystal/formatIndices.js';
import { loadScenario, warnAbout } from './loadScenario.js';
import { printJson, table } from './run.js';

const MARK = { visible: 'V', invisible: 'i', 'weak residual': 'w', weak: 'w' } as const;

function cell(e: VisibilityTableEntry): string {
  const gbxu = e.gbxu !== undefined && e.gb === 0 ? ` (${frac(e.gbxu)})` : '';
  if (e.simulated === undefined) return `${frac(e.gb)}${gbxu} ${MARK[e.verdict]} rule`;
  const peak = Math.max(e.simulated.bf, e.simulated.df);
  const inf = e.infiniteMedium;
  // the infinite medium's verdict only where it differs (the JSON has it always)
  const other = inf === undefined || inf.verdict === e.verdict ? '' : ` [inf. ${MARK[inf.verdict]} ${Math.round(100 * Math.max(inf.bf, inf.df))}%]`;
  return `${frac(e.gb)}${gbxu} ${MARK[e.verdict]} ${Math.round(100 * peak)}%${other} (rule ${MARK[e.ruleVerdict]})`;
}

export function formatVisibility(sc: Scenario, rows: readonly VisibilityRow[]): string {
  const l = sc.material.lattice;
  const header = ['defect / candidate', 'b', 'u', ...sc.conditions.map((c) => `${c.id} ${formatPlaneIn(l, c.g)}`)];
  const body = rows.map((r) => [r.subject, formatDirectionIn(l, r.b), r.line ? formatDirectionIn(l, r.line) : '-', ...r.entries.map(cell)]);
  const fields =
    sc.surfaces === 'relaxed'
      ? 'fields: relaxed foil surfaces (the scenario\'s setting; "[inf. ...]": the infinite medium gives another verdict: the\n' +
        '       corrections of an inclined line are approximate away from where it meets the surfaces, README Foil surfaces)\n'
      : 'fields: infinite medium ("surfaces": "infinite")\n';
  return (
    table(header, body) +
    fields +
    'cells: g.b (for g.b = 0 then g.(b x u) in brackets), the verdict from a simulated strip of columns across the line\n' +
    '       (for a loop: a patch of columns over it, against the perfect crystal)\n' +
    `       (two-beam at the condition's s, the scenario's thickness, the line's depth; candidates at mid-depth),\n` +
    `       its peak contrast |I - I_ref|/I_background in bright or dark field, and the g.b rule's verdict.\n` +
    `verdict: V visible (peak >= ${Math.round(100 * VISIBLE_CONTRAST)}%), w weak (${Math.round(100 * WEAK_CONTRAST)}-${Math.round(100 * VISIBLE_CONTRAST)}%), i invisible (< ${Math.round(100 * WEAK_CONTRAST)}%); thresholds are common practice, our choice.\n` +
    '       "rule" alone: a candidate without a line direction, nothing simulated.\n' +
    'rules: g.b = 0 and g.(b x u) = 0 invisible, unless g.b_edge != 0 (mixed line with g.u != 0: weak residual);\n' +
    '       g.b = 0 and |g.(b x u)| < 0.64 weak residual (Hirsch et al. 1965);\n' +
    '       partials |g.b| = 1/3 invisible, 2/3 visible (Howie & Whelan 1962). For partials the simulated contrast is the\n' +
    '       line\'s own, against the fault it bounds.\n'
  );
}

function frac(x: number): string {
  for (const d of [1, 2, 3, 4, 6]) {
    const n = Math.round(x * d);
    if (Math.abs(n / d - x) < 1e-6) return d === 1 ? String(n) : `${n}/${d}`;
  }
  return x.toFixed(3);
}

export function visibilityCommand(file: string, opts: { json?: boolean }): void {
  const sc = loadScenario(file);
  const warnings = warnAbout(sc);
  const rows = visibilityTable(sc);
  if (opts.json) {
    printJson({ scenario: sc.name, rows, warnings });
    return;
  }
  if (rows.length === 0) {
    process.stdout.write('the scenario has no dislocations and no candidate Burgers vectors: nothing to tabulate (faults and inclusions: use `thinfoil fault`)\n');
    return;
  }
  process.stdout.write(formatVisibility(sc, rows));
}
