/** `thinfoil nature <scenario>` (also `fault`): fault nature, misfit sign and loop nature read-outs by simulation. */
import { analyseFaults, type FaultConditionAnalysis } from '../analysis/faultFringes.js';
import { analyseInclusions, type InclusionConditionAnalysis } from '../analysis/inclusionLobes.js';
import { analyseLoops, type LoopConditionReading } from '../analysis/loopReadout.js';
import { indicesWithFraction } from '../crystal/formatIndices.js';
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
        indicesWithFraction(x.vector),
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

export function formatLoops(rows: readonly LoopConditionReading[]): string {
  if (rows.length === 0) return '';
  const body: string[][] = [];
  const small: string[] = [];
  const pairs: string[] = [];
  for (const r of rows) {
    for (const x of r.natures) {
      const side = (y: { side: string; offset_nm: number }) => (r.small ? '-' : y.side === 'inside' || y.side === 'outside' ? `${y.side} (${sig(y.offset_nm, 2)} nm)` : y.side);
      const bw = x.blackWhite === undefined ? '-' : x.blackWhite.sign === 0 ? 'no lobes' : `${x.blackWhite.sign > 0 ? 'along +g' : 'along -g'} (${sig(Math.hypot(...x.blackWhite.l_nm), 2)} nm)`;
      body.push([r.loop, r.condition, `(${r.g.join(' ')})`, sig(r.w, 3), x.nature, indicesWithFraction(x.b), sig(x.gb, 3), r.small ? '-' : x.rulePlus, side(x.plus), side(x.minus), bw]);
      if (x.depthSeries !== undefined) {
        small.push(`  ${r.loop}, ${r.condition}, ${x.nature}: sign of l.g with depth ${x.depthSeries.map((q) => `${Math.round(q.depth_nm)} nm ${q.sign > 0 ? '+' : q.sign < 0 ? '-' : '0'}`).join(', ')}`);
      }
    }
    if (r.note) pairs.push(`  ${r.loop}, ${r.condition}: ${r.note}`);
    else if (r.pair) pairs.push(`  ${r.loop}, ${r.condition}: ${r.pair}`);
    else pairs.push(`  ${r.loop}, ${r.condition}: the simulated +g/-g pair does not separate the natures here; choose another g, or s > 0 with |w| near 1`);
  }
  return (
    table(['loop', 'condition', 'g', 'w', 'nature', 'b', 'g.b', 'rule at +g', 'image at +g', 'image at -g', 'black-white l (+g)'], body) +
    'Image side from the simulated dark-field image: offset of its brightest line from the projected loop line (> 0 outside).\n' +
    'Rule (this project\'s bookkeeping, b FS/RH about the line counterclockwise about the loop normal n, B the beam):\n' +
    'outside when (g.b) s (n.B) > 0 (inside-outside method: Edington 1975; Williams & Carter 2009). Take s > 0, |w| near 1.\n' +
    `${pairs.join('\n')}\n` +
    (small.length ? `Small loops: black-white vector l from the dark to the bright lobe (dark field; Rühle 1967):\n${small.join('\n')}\n` : '') +
    'Simulation, not measurement.\n'
  );
}

export interface NatureReport {
  faults: FaultConditionAnalysis[];
  inclusions: InclusionConditionAnalysis[];
  loops: LoopConditionReading[];
}

/** `loops: false` leaves the loops out (their read-out renders each loop several times per condition). */
export function faultReport(sc: Scenario, onStep?: (label: string, fraction: number) => void, opts: { loops?: boolean } = {}): NatureReport {
  const withLoops = opts.loops ?? true;
  const nf = sc.defects.filter((d) => d.type === 'fault').length;
  const ni = sc.defects.filter((d) => d.type === 'inclusion').length;
  const nl = withLoops ? sc.defects.filter((d) => d.type === 'loop').length : 0;
  const total = (nf + ni + nl) * sc.conditions.length;
  let k = 0;
  const step = onStep === undefined ? undefined : (label: string) => onStep(`analysing ${label}`, total === 0 ? 1 : k++ / total);
  return { faults: analyseFaults(sc, 400, step), inclusions: analyseInclusions(sc, 24, step), loops: withLoops ? analyseLoops(sc, step) : [] };
}

export function faultCommand(file: string, opts: { json?: boolean; progressJson?: boolean }): void {
  const sc = loadScenario(file);
  const warnings = warnAbout(sc);
  const bar = progressBar({ jsonLines: opts.progressJson === true });
  let r: NatureReport;
  try {
    r = faultReport(sc, (label, f) => bar.update(label.length > 48 ? `${label.slice(0, 45)}...` : label, f));
  } finally {
    bar.done();
  }
  if (opts.json) {
    printJson({ scenario: sc.name, ...r, warnings });
    return;
  }
  if (r.faults.length === 0 && r.inclusions.length === 0 && r.loops.length === 0) {
    process.stdout.write('the scenario has no planar fault ("type": "fault"), inclusion or loop: nothing to analyse\n');
    return;
  }
  const parts = [formatFaults(r.faults), formatInclusions(r.inclusions), formatLoops(r.loops)].filter((x) => x !== '');
  process.stdout.write(parts.join('\n'));
}
