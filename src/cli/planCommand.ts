/**
 * `thinfoil plan <scenario>`: which two-beam conditions to take, within the
 * holder's tilt ranges, to identify the Burgers vector (and its sign) of one
 * dislocation or loop of the scenario, judged on simulated images; table, JSON and a
 * stereographic projection (PNG, SVG).
 */
import { join } from 'node:path';
import type { Vec3 } from '../math/vec3.js';
import { directionToCartesian, usesFourIndices, type Lattice } from '../crystal/lattice.js';
import { directionToFour, planeToFour } from '../crystal/millerBravais.js';
import { readDirection } from '../scenario/parse.js';
import { InputError } from '../errors.js';
import { OutputSet } from '../output/outputSet.js';
import { stereogramFigure } from '../output/stereogram.js';
import { formatDirectionIn } from '../crystal/formatIndices.js';
import { beamInSpecimenFrame, checkRange, orientation, orientationFromBeam, withinRange, type Holder, type HolderKind, type Orientation } from '../planning/holder.js';
import { plan, PLAN_DEFAULTS, type PlanResult } from '../planning/plan.js';
import { numberOption } from './options.js';
import { loadScenario } from './loadScenario.js';
import type { Scenario } from '../scenario/types.js';
import { slug } from './slug.js';
import { printJson, sig, table } from './run.js';

export interface PlanCommandOptions {
  holder?: string;
  primary?: string;
  secondary?: string;
  axis?: string;
  beamNow?: string;
  tilts?: string;
  gMax?: string;
  zoneIndex?: string;
  offZone?: string;
  w?: string;
  minDifference?: string;
  defect?: string;
  out?: string;
  json?: boolean;
}

function pair(text: string, name: string): [number, number] {
  const parts = text.split(/[,\s]+/).filter((x) => x !== '');
  const read = numberOption(name, -360, 360, 'an angle in degrees');
  if (parts.length !== 2) throw new InputError(`${name}: "${text}" must be two angles in degrees, low,high (e.g. -30,30)`);
  return [read(parts[0]), read(parts[1])];
}

// hexagonal crystals are shown in four indices (directions scaled to whole numbers)
let fourIndex = false;
const fmtG = (v: Vec3) => `(${(fourIndex ? planeToFour(v) : v).join(' ')})`;
function fmtV(v: Vec3): string {
  if (!fourIndex) return `[${v.join(' ')}]`;
  const d = directionToFour(v).map((x) => x * 3);
  const k = [2, 3, 5].reduce((acc, p) => (d.every((x) => Math.round(x) % (acc * p) === 0) ? acc * p : acc), 1);
  return `[${d.map((x) => Math.round(x) / k + 0).join(' ')}]`;
}

export async function planCommand(scenarioPath: string, opts: PlanCommandOptions): Promise<void> {
  const sc = loadScenario(scenarioPath);
  fourIndex = usesFourIndices(sc.material.lattice);
  const kind = (opts.holder ?? 'double') as HolderKind;
  if (kind !== 'double' && kind !== 'rotation') throw new InputError(`--holder: "${opts.holder}" is not a holder type; give double or rotation`);
  const primary = pair(opts.primary ?? '-30,30', '--primary');
  const secondary = pair(opts.secondary ?? (kind === 'double' ? '-30,30' : '-180,180'), '--secondary');
  checkRange('--primary', primary, 90);
  checkRange('--secondary', secondary, kind === 'double' ? 90 : 180);
  const holder: Holder = { kind, primary_deg: primary, secondary_deg: secondary };
  const current = pair(opts.tilts ?? '0,0', '--tilts');
  if (!withinRange(holder, { primary_deg: current[0], secondary_deg: current[1] })) {
    throw new InputError(`--tilts: ${current[0]},${current[1]} lies outside the holder's ranges (${primary[0]}..${primary[1]}, ${secondary[0]}..${secondary[1]} degrees); give the current tilts within them`);
  }
  const l = sc.material.lattice;
  const normal = directionToCartesian(l, sc.foilNormal);
  const axis = opts.axis === undefined ? sc.imageX_cart : directionToCartesian(l, readDirection(opts.axis, '--axis', sc.material));
  const o: Orientation =
    opts.beamNow === undefined
      ? orientation(normal, axis)
      : orientationFromBeam(kind, { primary_deg: current[0], secondary_deg: current[1] }, directionToCartesian(l, readDirection(opts.beamNow, '--beam-now', sc.material)), axis);
  const num = (t: string | undefined, name: string, lo: number, hi: number, unit: string, d: number) => (t === undefined ? d : numberOption(name, lo, hi, unit)(t));
  const zoneIndex = num(opts.zoneIndex, '--zone-index', 1, 6, 'the largest index of a zone axis', PLAN_DEFAULTS.zoneIndexMax);
  if (!Number.isInteger(zoneIndex)) throw new InputError(`--zone-index: ${zoneIndex} must be a whole number from 1 to 6`);
  const defect = num(opts.defect, '--defect', 0, 1e6, 'the index of a defect', 0);
  if (!Number.isInteger(defect)) throw new InputError(`--defect: ${defect} must be a whole number (the index of a defect, from 0)`);
  const minDifference = num(opts.minDifference, '--min-difference', 0.001, 2, 'a contrast difference (fraction of the background)', PLAN_DEFAULTS.strip.minDifference);
  // the output folder is checked before the planning work, so a refusal costs nothing
  const set = OutputSet.begin(opts.out ?? join('out', `${slug(sc.name)}-plan`), { inputs: [scenarioPath] });
  let json: ReturnType<typeof planJson> & { zeroTilt: { beam_cart: Vec3; primaryAxis_cart: Vec3 } };
  let result: PlanResult;
  let files: string[];
  try {
    result = plan(sc, {
      holder,
      orientation: o,
      current: { primary_deg: current[0], secondary_deg: current[1] },
      gMax_per_nm: num(opts.gMax, '--g-max', 0.5, 40, 'the largest |g| in nm^-1', PLAN_DEFAULTS.gMax_per_nm),
      zoneIndexMax: zoneIndex,
      offZone_deg: num(opts.offZone, '--off-zone', 0.5, 20, 'the tilt off the zone axis in degrees', PLAN_DEFAULTS.offZone_deg),
      w: num(opts.w, '--w', -10, 10, 'the deviation w = s xi_g', PLAN_DEFAULTS.w),
      defectIndex: defect,
      strip: { ...PLAN_DEFAULTS.strip, minDifference },
      exactUpTo: PLAN_DEFAULTS.exactUpTo,
    });

    // figure
    const inFrame = (c: Vec3): Vec3 => [c[0] * o.X[0] + c[1] * o.X[1] + c[2] * o.X[2], c[0] * o.Y[0] + c[1] * o.Y[1] + c[2] * o.Y[2], c[0] * o.Z[0] + c[1] * o.Z[1] + c[2] * o.Z[2]];
    const unitC = (uvw: Vec3) => {
      const c = directionToCartesian(l, uvw);
      const n = Math.hypot(...c);
      return [c[0] / n, c[1] / n, c[2] / n] as Vec3;
    };
    const region: Vec3[] = [];
    const [a0, a1] = primary, [b0, b1] = secondary;
    const edge = (fa: (t: number) => number, fb: (t: number) => number) => {
      for (let i = 0; i < 40; i++) region.push(beamInSpecimenFrame(kind, { primary_deg: fa(i / 40), secondary_deg: fb(i / 40) }));
    };
    if (kind === 'double') {
      edge((t) => a0 + (a1 - a0) * t, () => b0);
      edge(() => a1, (t) => b0 + (b1 - b0) * t);
      edge((t) => a1 - (a1 - a0) * t, () => b1);
      edge(() => a0, (t) => b1 - (b1 - b0) * t);
    } else {
      // the largest primary tilt swept over the rotation range bounds the region
      const am = Math.max(Math.abs(a0), Math.abs(a1));
      edge(() => am, (t) => -180 + 360 * t);
    }
    const chosenIds = new Set(result.steps.map((s) => s.condition.id));
    const fig = stereogramFigure({
      title: `${sc.name}: plan (${kind === 'double' ? 'double tilt' : 'rotation holder'} ${a0}..${a1} / ${b0}..${b1} deg)`,
      region,
      zones: result.zones.map((z) => ({ v: inFrame(unitC(z.zone)), label: fmtV(z.zone) })),
      steps: result.steps.map((s) => ({ v: inFrame(s.condition.beam_cart), label: fmtG(s.condition.g) })),
      others: result.conditions.filter((c) => !chosenIds.has(c.id)).map((c) => ({ v: inFrame(c.beam_cart), label: fmtG(c.g) })),
      start: inFrame(result.currentBeam_cart),
    });
    files = ['plan.png', 'plan.svg', 'plan.json'].map((n) => set.finalPath(n));
    set.write('plan.png', fig.png);
    set.write('plan.svg', fig.svg);
    json = { ...planJson(sc.name, holder, result, files), zeroTilt: { beam_cart: o.Z, primaryAxis_cart: o.X } };
    set.write('plan.json', JSON.stringify(json, null, 1) + '\n');
    set.commit();
  } catch (e) {
    set.abort();
    throw e;
  }
  if (opts.json) {
    printJson(json);
    return;
  }
  printPlan({ ...result, zeroTiltNormal: o.Z, zeroTiltAxis: o.X }, files, sc.material.lattice, sc.surfaces);
}

function planJson(name: string, holder: Holder, r: PlanResult, files: string[]) {
  const cond = (c: PlanResult['conditions'][number]) => ({
    id: c.id,
    g: c.g,
    g_per_nm: c.g_per_nm,
    xi_nm: c.xi_nm,
    zone: c.zone,
    zoneTilts_deg: [c.zoneTilts.primary_deg, c.zoneTilts.secondary_deg],
    tilts_deg: [c.tilts.primary_deg, c.tilts.secondary_deg],
    fromStart_deg: c.fromCurrent_deg,
    pairsSeparated: c.pairsSeparated,
    candidatesAlone: c.uniquelyIdentified,
    gb: c.gb,
    lineEndOn: c.endOn,
    condition: { id: c.id, g: c.g, w: (c.condition.deviation as { w: number }).w, beam: c.condition.beam },
  });
  return {
    scenario: name,
    holder,
    candidates: r.candidates.map((c) => c.label),
    pairs: r.nPairs,
    complete: r.complete,
    unseparated: r.unseparated,
    smallestSetByExhaustiveSearch: r.exactSize ?? null,
    steps: r.steps.map((s, i) => ({ order: i + 1, tilt_deg: s.tilt_deg, ...cond(s.condition) })),
    totalTilt_deg: r.totalTilt_deg,
    reachable: r.conditions.map(cond),
    zones: r.zones.map((z) => ({ zone: z.zone, tilts_deg: [z.tilts.primary_deg, z.tilts.secondary_deg], fromStart_deg: z.fromCurrent_deg })),
    files,
  };
}

function printPlan(r: PlanResult & { zeroTiltNormal: Vec3; zeroTiltAxis: Vec3 }, files: string[], lattice: Lattice, surfaces: Scenario['surfaces']): void {
  const w = process.stdout;
  const bText = (b: Vec3) => formatDirectionIn(lattice, b);
  const z = r.zeroTiltNormal;
  w.write(`beam direction at zero tilt: [${z.map((x) => sig(x, 3)).join(' ')}] (Cartesian, crystal frame); primary tilt axis along [${r.zeroTiltAxis.map((x) => sig(x, 3)).join(' ')}]\n`);
  w.write(`candidates: ${r.candidates.length} (${r.candidates.map((c) => bText(c.b!)).join(', ')}), ${r.nPairs} pairs to tell apart\n\n`);
  const loop = r.candidates[0].defect.type === 'loop';
  w.write(`reachable two-beam conditions (simulated bright-field ${loop ? 'patches over the loop' : 'strips across the line'}, ${surfaces === 'relaxed' ? 'relaxed foil surfaces' : 'infinite medium'}):\n`);
  w.write(table(
    ['g', '|g| nm^-1', 'xi_g nm', 'near zone', 'zone tilts', 'g tilts', 'pairs told apart', 'g.b of the candidates'],
    r.conditions.map((c) => [
      fmtG(c.g),
      sig(c.g_per_nm, 4),
      sig(c.xi_nm, 4),
      fmtV(c.zone),
      `${c.zoneTilts.primary_deg.toFixed(1)}, ${c.zoneTilts.secondary_deg.toFixed(1)}`,
      `${c.tilts.primary_deg.toFixed(1)}, ${c.tilts.secondary_deg.toFixed(1)}`,
      c.endOn ? 'line end-on' : `${c.pairsSeparated}/${r.nPairs}`,
      c.gb.map((x) => sig(x, 2)).join(' '),
    ]),
  ));
  w.write('\nplan, in the order of least tilting:\n');
  w.write(table(
    ['step', 'g', 'tilts (primary, secondary) deg', 'tilt from previous deg', 'near zone', 'xi_g nm'],
    r.steps.map((s, i) => [String(i + 1), fmtG(s.condition.g), `${s.condition.tilts.primary_deg.toFixed(1)}, ${s.condition.tilts.secondary_deg.toFixed(1)}`, s.tilt_deg.toFixed(1), fmtV(s.condition.zone), sig(s.condition.xi_nm, 4)]),
  ));
  if (r.complete) {
    w.write(`these ${r.steps.length} condition(s) tell every candidate, sign included, from every other in simulation; total tilt ${r.totalTilt_deg.toFixed(1)} deg`);
    w.write(r.exactSize === undefined ? ` (exhaustive search up to ${PLAN_DEFAULTS.exactUpTo}: no smaller set)\n` : ` (exhaustive search: the smallest set has ${r.exactSize})\n`);
  } else {
    w.write(`no reachable condition tells these apart: ${r.unseparated.map(([a, b]) => `${a} / ${b}`).join('; ')}; widen the tilt ranges or raise --g-max\n`);
  }
  w.write(`g.b column, candidates in order: ${r.candidates.map((c) => bText(c.b!)).join(', ')}\n`);
  w.write(`figure and JSON: ${files.join(', ')}\n`);
}
