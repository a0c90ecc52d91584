/** `thinfoil fault <scenario>`: fault nature and misfit sign read-outs by simulation. */
import { analyseFaults, type FaultConditionAnalysis } from '../analysis/faultFringes.js';
import { analyseInclusions, type InclusionConditionAnalysis } from '../analysis/inclusionLobes.js';
import { formatVector } from '../scenario/parse.js';
import type { Scenario } from '../scenario/types.js';
import { loadScenario, warnAbout } from './loadScenario.js';
import { printJson, sig, table } from './run.js';
import { progressBar } from './progress.js';

function direction(d: readonly [number, number]): string {
  // image: +x right, +y down; report as compass-like words and an angle counter-clockwise from +x
  const ang = (Math.atan2(-d[1], d[0]) * 180) / Math.PI;
  return `${Math.round(ang)} deg`;
}

export function formatFaults(rows: readonly FaultConditionAnalysis[]): string {
  if (rows.length === 0) return '';
  const body: string[][] = [];
  for (const r of rows) {
    if (r.edgeOn) {
      body.push([r.fault, r.condition, `(${r.g.join(' ')})`, '-', '-', '-', '', '', '', '', r.note]);
      continue;
    }
    for (const x of r.readings) {
      body.push([
        r.fault,
        r.condition,
        `(${r.g.join(' ')})`,
        x.reading,
        formatVector(x.vector),
        `${sig(x.alpha_deg, 4)}`,
        x.bf.top,
        x.bf.bottom,
        x.df.top,
        x.df.bottom,
        r.note,
      ]);
    }
  }
  const geo = rows
    .filter((r) => !r.edgeOn)
    .map((r) => `  ${r.fault}, ${r.condition}: fault image ${sig(r.width_nm, 3)} nm wide; its top-surface end lies towards ${direction(r.topDirection)} (counter-clockwise from +x); g points ${r.gTowardsTop > 0 ? 'towards the top-surface end' : r.gTowardsTop < 0 ? 'towards the bottom-surface end' : 'along the fault trace'}`)
    .join('\n');
  return (
    table(['fault', 'condition', 'g', 'reading', 'R_f', 'alpha (deg)', 'BF top', 'BF bottom', 'DF top', 'DF bottom', 'read-out'], body) +
    `${geo}\n` +
    'Outer fringes: "top" is the end where the fault meets the entrance surface. Compare the simulated tones\n' +
    'of each reading with your bright/dark-field pair (Hashimoto, Howie & Whelan 1962). Simulation, not measurement.\n'
  );
}

export function formatInclusions(rows: readonly InclusionConditionAnalysis[]): string {
  if (rows.length === 0) return '';
  const body = rows.flatMap((r) =>
    r.readings.map((x) => [r.inclusion, r.condition, `(${r.g.join(' ')})`, x.misfitSign, sig(x.strain, 3), x.bfDark, x.dfDark]),
  );
  return (
    table(['inclusion', 'condition', 'g', 'misfit', 'strain eps', 'dark lobe (BF)', 'dark lobe (DF)'], body) +
    'Two lobes with a line of no contrast perpendicular to g (Ashby & Brown 1963); the side of the dark lobe\n' +
    'relative to g depends on the misfit sign and on the depth of the inclusion: compare with your images.\n'
  );
}

export function faultReport(sc: Scenario, onStep?: (label: string, fraction: number) => void): { faults: FaultConditionAnalysis[]; inclusions: InclusionConditionAnalysis[] } {
  const nf = sc.defects.filter((d) => d.type === 'fault').length;
  const ni = sc.defects.filter((d) => d.type === 'inclusion').length;
  const total = (nf + ni) * sc.conditions.length;
  let k = 0;
  const step = onStep === undefined ? undefined : (label: string) => onStep(`analysing ${label}`, total === 0 ? 1 : k++ / total);
  return { faults: analyseFaults(sc, 400, step), inclusions: analyseInclusions(sc, 24, step) };
}

export function faultCommand(file: string, opts: { json?: boolean; progressJson?: boolean }): void {
  const sc = loadScenario(file);
  const warnings = warnAbout(sc);
  const bar = progressBar({ jsonLines: opts.progressJson === true });
  let r: ReturnType<typeof faultReport>;
  try {
    r = faultReport(sc, (label, f) => bar.update(label.length > 48 ? `${label.slice(0, 45)}...` : label, f));
  } finally {
    bar.done();
  }
  if (opts.json) {
    printJson({ scenario: sc.name, ...r, warnings });
    return;
  }
  if (r.faults.length === 0 && r.inclusions.length === 0) {
    process.stdout.write('the scenario has no planar fault ("type": "fault") and no inclusion: nothing to analyse\n');
    return;
  }
  process.stdout.write(formatFaults(r.faults));
  if (r.faults.length && r.inclusions.length) process.stdout.write('\n');
  process.stdout.write(formatInclusions(r.inclusions));
}
