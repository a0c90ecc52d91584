/** `thinfoil visibility <scenario>`: the g.b table with verdicts. */
import type { Scenario } from '../scenario/types.js';
import { visibilityTable, type VisibilityRow } from '../analysis/visibilityTable.js';
import { formatVector } from '../scenario/parse.js';
import { loadScenario, warnAbout } from './loadScenario.js';
import { printJson, table } from './run.js';

const MARK = { visible: 'V', invisible: 'i', 'weak residual': 'w' } as const;

export function formatVisibility(sc: Scenario, rows: readonly VisibilityRow[]): string {
  const header = ['defect / candidate', 'b', 'u', ...sc.conditions.map((c) => `${c.id} (${c.g.join(' ')})`)];
  const body = rows.map((r) => [
    r.subject,
    formatVector(r.b),
    r.line ? formatVector(r.line) : '-',
    ...r.entries.map((e) => `${frac(e.gb)} ${MARK[e.verdict]}${e.gbxu !== undefined && e.gb === 0 ? ` (${frac(e.gbxu)})` : ''}`),
  ]);
  return (
    table(header, body) +
    'cells: g.b then V visible, i invisible, w weak residual; for g.b = 0 the value g.(b x u) follows in brackets.\n' +
    'rules: g.b = 0 and g.(b x u) = 0 invisible, unless g.b_edge != 0 (mixed line with g.u != 0: weak residual);\n' +
    '       g.b = 0 and |g.(b x u)| < 0.64 weak residual (Hirsch et al. 1965);\n' +
    '       partials |g.b| = 1/3 invisible, 2/3 visible (Howie & Whelan 1962). A rule of thumb: simulate to be sure.\n'
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
