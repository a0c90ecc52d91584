/**
 * `thinfoil traces <material | scenario.json> --view "..." --view "..."`:
 * the line direction u of a straight dislocation from its traces on
 * micrographs taken in two or more beam directions (src/analysis/traces.ts),
 * the low-index planes containing u, the glide plane of each candidate b
 * (src/analysis/traceGlide.ts) and, from a projected length, its inclination
 * and a thickness check (src/analysis/traceLength.ts).
 *
 * A view is a list of key=value pairs separated by spaces or semicolons:
 *   beam=0,1,1 g=2,0,0 gAngle=10 lineAngle=75 [error=1] [length=140 [lengthError=5]]
 * or, with a scenario, condition=<id> instead of beam and g (gAngle then
 * defaults to the scenario's "micrographs".<id>.gAngle_deg when present).
 */
import { existsSync } from 'node:fs';
import type { Vec3 } from '../math/vec3.js';
import { getMaterial } from '../crystal/materials.js';
import type { Material } from '../crystal/material.js';
import { directionToCartesian, usesFourIndices } from '../crystal/lattice.js';
import { formatDirectionIn, formatPlaneIn } from '../crystal/formatIndices.js';
import { parseFamily } from '../crystal/symmetry.js';
import { isForbidden } from '../scattering/reflection.js';
import { directionText } from '../geometry/conditionGeometry.js';
import { readDirection, readPlane, readVector, parseScenario } from '../scenario/parse.js';
import type { Scenario } from '../scenario/types.js';
import { InputError } from '../errors.js';
import { fitLineDirection, planesContaining, startingLine, type TraceFit, type TraceView } from '../analysis/traces.js';
import { glidePlane, slipFamilies } from '../analysis/traceGlide.js';
import { lengthCheck, type LengthCheck } from '../analysis/traceLength.js';
import { chiSquareSurvival } from '../analysis/chiSquare.js';
import { parseMicrographSettings, type MicrographSettings } from '../analysis/identifySettings.js';
import { readScenarioJson } from './loadScenario.js';
import { numberOption } from './options.js';
import { printJson, sig, table } from './run.js';

export interface TracesOptions {
  /** Repeatable options: undefined when not given. */
  view?: string[];
  b?: string[];
  angleError?: string;
  thickness?: string;
  thicknessError?: string;
  normal?: string;
  json?: boolean;
}

const VIEW_KEYS = ['beam', 'g', 'gAngle', 'lineAngle', 'error', 'length', 'lengthError', 'condition'];

interface ParsedView {
  readonly view: TraceView;
  readonly length_nm?: number;
  readonly lengthError_nm: number;
}

/** key=value pairs of one --view; values may be bracketed indices with spaces ("[0 1 1]"). */
function viewPairs(text: string, name: string): Map<string, string> {
  const out = new Map<string, string>();
  const re = /\s*([A-Za-z]+)\s*=\s*(\[[^\]]*\]|\([^)]*\)|[^\s;]+)\s*;?/y;
  let pos = 0;
  const t = text.trim();
  while (pos < t.length) {
    re.lastIndex = pos;
    const m = re.exec(t);
    if (m === null) {
      throw new InputError(`${name}: cannot read "${t.slice(pos, pos + 30)}"; write key=value pairs such as "beam=0,1,1 g=2,0,0 gAngle=10 lineAngle=75"`);
    }
    const key = m[1];
    if (!VIEW_KEYS.includes(key)) throw new InputError(`${name}: unknown key "${key}"; the keys are ${VIEW_KEYS.join(', ')}`);
    if (out.has(key)) throw new InputError(`${name}: "${key}" is given twice; give it once`);
    out.set(key, m[2]);
    pos = re.lastIndex;
  }
  return out;
}

function parseView(text: string, i: number, m: Material, sc: Scenario | undefined, micrographs: ReadonlyMap<string, MicrographSettings>, defaultError: number): ParsedView {
  const name = `--view ${i + 1}`;
  const kv = viewPairs(text, name);
  const num = (key: string, lo: number, hi: number, what: string) => {
    const v = kv.get(key);
    return v === undefined ? undefined : numberOption(`${name} ${key}`, lo, hi, what)(v);
  };
  let beam: Vec3 | undefined;
  let g: Vec3 | undefined;
  let gAngle = num('gAngle', -360, 360, 'the direction of g on the micrograph in degrees');
  const cond = kv.get('condition');
  if (cond !== undefined) {
    if (sc === undefined) throw new InputError(`${name} condition: a condition id needs a scenario file as the first argument; give beam= and g= instead`);
    const c = sc.conditions.find((x) => x.id === cond);
    if (c === undefined) throw new InputError(`${name} condition: "${cond}" is not a condition of the scenario; use one of ${sc.conditions.map((x) => x.id).join(', ')}`);
    if (kv.has('beam') || kv.has('g')) throw new InputError(`${name}: give either condition= or beam= and g=, not both`);
    beam = c.beam;
    g = c.g;
    if (gAngle === undefined) gAngle = micrographs.get(cond)?.gAngle_deg;
  } else {
    const b = kv.get('beam');
    const gg = kv.get('g');
    if (b === undefined) throw new InputError(`${name} beam: missing; give the beam direction of that micrograph, e.g. beam=0,1,1`);
    if (gg === undefined) throw new InputError(`${name} g: missing; give a reflection of that zone whose direction on the micrograph you know, e.g. g=2,0,0`);
    beam = readDirection(b, `${name} beam`, m);
    g = readPlane(gg, `${name} g`, m);
    // only g's direction enters the fit, but a reflection that cannot be excited is a typo or a misread pattern
    if (!g.every((h) => Number.isInteger(h))) throw new InputError(`${name} g: (${g.join(' ')}) is not a reflection; give whole-number indices of the reflection that was excited, e.g. g=2,0,0`);
    if (isForbidden(m, g)) {
      const g2: Vec3 = [2 * g[0], 2 * g[1], 2 * g[2]];
      const hint = isForbidden(m, g2) ? '' : `, e.g. ${formatPlaneIn(m.lattice, g2)}`;
      throw new InputError(`${name} g: ${formatPlaneIn(m.lattice, g)} is forbidden for the ${m.structure} structure of ${m.name} (its structure factor vanishes by symmetry); give the reflection that was excited${hint}`);
    }
  }
  if (gAngle === undefined) throw new InputError(`${name} gAngle: missing; give the direction of g on the micrograph in degrees counter-clockwise from +x (+y down), e.g. gAngle=10`);
  const lineAngle = num('lineAngle', -360, 360, 'the direction of the line on the micrograph in degrees');
  if (lineAngle === undefined) throw new InputError(`${name} lineAngle: missing; give the direction of the projected line in degrees counter-clockwise from +x (+y down), e.g. lineAngle=75`);
  const error = num('error', 0.01, 45, 'the one-sigma error of the measured angles in degrees') ?? defaultError;
  const length = num('length', 1e-6, 1e6, 'the projected length in nm');
  const lengthError = num('lengthError', 0, 1e6, 'the one-sigma error of the length in nm') ?? 0;
  if (kv.has('lengthError') && length === undefined) throw new InputError(`${name} lengthError: given without length=; give the projected length too`);
  return {
    view: { beam, g, gAngle_deg: gAngle, lineAngle_deg: lineAngle, angleError_deg: error, name },
    ...(length === undefined ? {} : { length_nm: length }),
    lengthError_nm: lengthError,
  };
}

/** The candidate Burgers vectors: --b values (vectors or families, signs collapsed), else the scenario's candidates. */
function candidateVectors(opts: TracesOptions, m: Material, sc: Scenario | undefined): Vec3[] {
  const out: Vec3[] = [];
  const same = (x: Vec3, b: Vec3, k: number) => x.every((v, i) => Math.abs(v - k * b[i]) < 1e-9);
  const add = (b: Vec3) => {
    if (!out.some((x) => same(x, b, 1) || same(x, b, -1))) out.push(b);
  };
  (opts.b ?? []).forEach((text, i) => {
    const field = `--b ${i + 1}`;
    if (/[<>{}]/.test(text)) {
      const f = parseFamily(text, m, { collapseSign: true, field });
      if (f.kind !== 'direction') throw new InputError(`${field}: "${text}" is a family of planes; give Burgers vectors with <...>, e.g. "1/2<110>"`);
      f.members.forEach(add);
    } else add(readVector(text, field, m));
  });
  if ((opts.b ?? []).length === 0 && sc !== undefined) sc.candidates.forEach((c) => add(c.b));
  return out;
}

// degrees and nm: below 1e-9 is rounding noise of an exact zero (a line lying in a plane), printed as 0
const f1 = (x: number) => sig(Math.abs(x) < 1e-9 ? 0 : x, 3);
const bText = (m: Material, b: Vec3) => formatDirectionIn(m.lattice, b);

export function tracesCommand(subject: string, given: TracesOptions): void {
  const opts = { ...given, view: given.view ?? [], b: given.b ?? [] };
  let m: Material;
  let sc: Scenario | undefined;
  // the scenario's "micrographs" settings, validated as identify validates them (a bad value names its JSON path)
  let micrographs: ReadonlyMap<string, MicrographSettings> = new Map();
  if (/\.json$/i.test(subject) || (existsSync(subject) && !/^[A-Za-z][A-Za-z0-9_-]*$/.test(subject))) {
    const raw = readScenarioJson(subject);
    sc = parseScenario(raw);
    m = sc.material;
    micrographs = parseMicrographSettings(raw.micrographs, sc.conditions.map((c) => c.id));
  } else {
    m = getMaterial(subject, 'material');
  }
  const l = m.lattice;
  const defaultError = opts.angleError === undefined ? 1 : numberOption('--angle-error', 0.01, 45, 'the one-sigma error of the measured angles in degrees')(opts.angleError);
  if (opts.view.length < 2) throw new InputError('--view: trace analysis needs at least two views taken in different beam directions; give --view once per micrograph, e.g. --view "beam=0,0,1 g=2,0,0 gAngle=0 lineAngle=45"');
  if (opts.view.length > 24) throw new InputError(`--view: ${opts.view.length} views given; give at most 24`);
  const views = opts.view.map((t, i) => parseView(t, i, m, sc, micrographs, defaultError));
  const fit = fitLineDirection(l, views.map((v) => v.view));
  const bs = candidateVectors(opts, m, sc);

  const thickness = opts.thickness === undefined ? sc?.thickness_nm : numberOption('--thickness', 1, 1e5, 'the foil thickness in nm')(opts.thickness);
  const thicknessError = opts.thicknessError === undefined ? 0 : numberOption('--thickness-error', 0, 1e5, 'the one-sigma error of the thickness in nm')(opts.thicknessError);
  if (opts.thicknessError !== undefined && thickness === undefined) throw new InputError('--thickness-error: given without --thickness; give the foil thickness too');
  const normalLattice = opts.normal === undefined ? sc?.foilNormal : readDirection(opts.normal, '--normal', m);
  const lengths: { view: string; check: LengthCheck }[] = [];
  for (const v of views) {
    if (v.length_nm === undefined) continue;
    if (normalLattice === undefined) throw new InputError(`--normal: a projected length (${v.view.name}) needs the foil normal; give it as a crystal direction, e.g. --normal 0,0,1`);
    lengths.push({
      view: v.view.name,
      check: lengthCheck(fit, {
        beam_cart: directionToCartesian(l, v.view.beam),
        normal_cart: directionToCartesian(l, normalLattice),
        length_nm: v.length_nm,
        lengthError_nm: v.lengthError_nm,
        ...(thickness === undefined ? {} : { thickness_nm: thickness }),
        thicknessError_nm: thicknessError,
      }),
    });
  }

  const planeTol = Math.max(0.5, 2 * fit.cone_deg);
  const planes = planesContaining(l, fit.u_cart, planeTol, 3).slice(0, 12);
  const glides = bs.map((b) => glidePlane(m, fit, b));
  const start = startingLine(fit);
  const p = fit.dof > 0 ? chiSquareSurvival(fit.chi2, fit.dof) : undefined;
  const nearOk = fit.nearest.angle_deg <= 2 * fit.cone_deg;

  if (opts.json) {
    printJson({
      material: m.name,
      convention: 'angles in degrees counter-clockwise from the image +x axis, +y down (as the micrograph is displayed); line angles modulo 180',
      u: fit.u,
      u_text: directionText(fit.u),
      u_cartesian: fit.u_cart,
      sigmaMajor_deg: fit.sigmaMajor_deg,
      sigmaMinor_deg: fit.sigmaMinor_deg,
      cone_deg: fit.cone_deg,
      nearest: { direction: fit.nearest.text, angle_deg: fit.nearest.angle_deg, withinTwoSigma: nearOk },
      chi2: fit.chi2,
      dof: fit.dof,
      pValue: p ?? 'none',
      views: views.map((v, i) => ({ ...v.view, ...fit.views[i], nearlyEndOn: fit.views[i].angleToBeam_deg < 10 })),
      planes: { tolerance_deg: planeTol, list: planes.map((q) => ({ plane: formatPlaneIn(l, q.hkl), hkl: q.hkl, angle_deg: q.angle_deg })) },
      slipFamilies: slipFamilies(m.structure),
      candidates: glides.map((gp) => ({
        b: bText(m, gp.b),
        angleToU_deg: gp.angleToB_deg,
        screw: gp.screw,
        ...(gp.screw
          ? {}
          : {
              glideNormal: gp.normal,
              glideNormalError_deg: gp.normalError_deg,
              nearestPlane: formatPlaneIn(l, gp.nearest!.hkl),
              nearestPlaneAngle_deg: gp.nearest!.angle_deg,
              matches: gp.matches,
              commonSlipPlane: gp.slipFamily ?? 'none',
            }),
      })),
      lengths: lengths.map((x) => ({ view: x.view, ...x.check })),
      startingLine: { line: start.line, cone_deg: start.cone_deg, note: 'paste "line" into the dislocation of the scenario; cone_deg is the half-angle to search within' },
    });
    return;
  }

  const out: string[] = [];
  out.push(`line direction u = ${directionText(fit.u)}  (${m.name}; unit Cartesian ${fit.u_cart.map((x) => sig(Math.abs(x) < 1e-12 ? 0 : x, 4)).join(', ')})`);
  out.push(`  one-sigma uncertainty: ${f1(fit.sigmaMajor_deg)} x ${f1(fit.sigmaMinor_deg)} degrees (cone ${f1(fit.cone_deg)} degrees), from the stated angle errors`);
  out.push(`  nearest low-index direction ${fit.nearest.text} at ${f1(fit.nearest.angle_deg)} degrees${nearOk ? ' (within two sigma)' : ' (farther than two sigma: u is not that direction)'}`);
  if (fit.dof === 0) out.push('  two views fix u exactly (no check of the traces); a third view in another beam direction tests them');
  else {
    out.push(`  fit: chi-square ${f1(fit.chi2)} for ${fit.dof} degree${fit.dof === 1 ? '' : 's'} of freedom, p = ${sig(p as number, 2)}${(p as number) < 0.01 ? ' - the traces do not agree within their stated errors (a wrong g direction, a mirrored micrograph, a curved line, or errors too small)' : ''}`);
  }
  out.push('');
  out.push(
    table(
      ['view', 'beam', 'g', 'g angle', 'line angle', 'fitted', 'residual', 'u to beam'],
      views.map((v, i) => [
        v.view.name.replace('--view ', ''),
        usesFourIndices(l) ? formatDirectionIn(l, v.view.beam) : `[${v.view.beam.join(' ')}]`,
        formatPlaneIn(l, v.view.g),
        f1(v.view.gAngle_deg),
        `${f1(v.view.lineAngle_deg)} +- ${f1(v.view.angleError_deg)}`,
        f1(fit.views[i].fittedLineAngle_deg),
        f1(fit.views[i].residual_deg),
        f1(fit.views[i].angleToBeam_deg),
      ]),
    ).trimEnd(),
  );
  for (const r of fit.views) {
    if (r.angleToBeam_deg < 10) out.push(`note: in ${r.name} the line runs ${f1(r.angleToBeam_deg)} degrees from the beam (nearly end-on): its trace is short and its angle hard to read; give that view a larger error= or leave it out`);
  }
  out.push('');
  out.push(
    planes.length === 0
      ? `low-index planes (indices up to 3) containing u within ${f1(planeTol)} degrees: none`
      : `low-index planes containing u (within ${f1(planeTol)} degrees): ${planes.map((q) => `${formatPlaneIn(l, q.hkl)} ${f1(q.angle_deg)}`).join(', ')}`,
  );
  if (glides.length > 0) {
    const fams = slipFamilies(m.structure);
    out.push('');
    out.push(`glide planes u x b (common slip planes of ${m.structure}: ${fams.length === 0 ? 'none listed' : fams.join(', ')})`);
    out.push(
      table(
        ['b', 'angle u-b', 'u x b', 'nearest plane', 'slip plane'],
        glides.map((gp) =>
          gp.screw
            ? [bText(m, gp.b), f1(gp.angleToB_deg), 'screw: no single plane', '', '']
            : [
                bText(m, gp.b),
                f1(gp.angleToB_deg),
                `${directionText(gp.normal!).replace('[', '(').replace(']', ')')} +- ${f1(gp.normalError_deg!)}`,
                `${formatPlaneIn(l, gp.nearest!.hkl)} at ${f1(gp.nearest!.angle_deg)}`,
                gp.matches ? (gp.slipFamily ?? 'no (not a common one)') : 'no low-index plane',
              ],
        ),
      ).trimEnd(),
    );
  }
  for (const x of lengths) {
    const c = x.check;
    out.push('');
    out.push(`projected length on ${x.view}: inclination of u to the foil surface ${f1(c.inclination_deg)} +- ${f1(c.inclinationError_deg)} degrees, ${f1(c.angleToBeam_deg)} degrees from the beam`);
    out.push(`  thickness implied by the length: ${sig(c.impliedThickness_nm, 4)} +- ${sig(c.impliedThicknessError_nm, 2)} nm`);
    if (c.predictedLength_nm !== undefined) {
      out.push(
        `  with t = ${sig(thickness as number, 4)} nm the line should project to ${sig(c.predictedLength_nm, 4)} +- ${sig(c.predictedLengthError_nm!, 2)} nm: ${c.consistent ? 'consistent' : 'NOT consistent'} (${sig(c.z!, 2)} sigma; the rule is |z| <= 2)`,
      );
    }
  }
  out.push('');
  out.push(`for the scenario's dislocation: "line": [${start.line.join(', ')}]  (search within ${f1(start.cone_deg)} degrees)`);
  process.stdout.write(out.join('\n') + '\n');
}
