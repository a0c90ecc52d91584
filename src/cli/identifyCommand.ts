/**
 * `thinfoil identify <scenario> --micrograph <conditionId>=<file> [...]`:
 * rank the candidates against the micrographs, print the ranking and the
 * verdict, write the comparison figure (PNG, SVG), the HTML report and the
 * result as JSON into the output folder.
 */
import { describeAbsorption } from '../scattering/absorption.js';
import { jsonText } from '../output/json.js';
import { basename, join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { parseScenario } from '../scenario/parse.js';
import { renderScenario } from '../imaging/renderScenario.js';
import { createRenderPool, type RenderPool } from '../imaging/workerPool.js';
import { decodeImage } from '../imageio/readImage.js';
import { MAX_FILE_BYTES } from '../imageio/types.js';
import { readInputFile } from './readInput.js';
import { excerpt } from '../errors.js';
import { identify, type IdentifyResult } from '../analysis/identify.js';
import { prepareMicrographs, type MicrographInput } from '../analysis/identifyMicrographs.js';
import { parseMicrographArgument, parseMicrographSettings } from '../analysis/identifySettings.js';
import { parseFitSettings, type FitSettings } from '../analysis/fitSettings.js';
import { isSyntheticName } from '../analysis/synthetic.js';
import { comparisonFigure, comparisonFigureData } from '../output/comparisonFigure.js';
import { identifyReportHtml } from '../output/report.js';
import { OutputSet } from '../output/outputSet.js';
import { progressBar } from './progress.js';
import { printJson, sig, table } from './run.js';
import { slug } from './slug.js';
import { printWarnings, readScenarioBytes, scenarioJsonOf } from './loadScenario.js';
import { fitWarnings } from '../analysis/scenarioWarnings.js';
import { identificationCandidates } from '../analysis/candidates.js';
import { measuredInputs, simulateCandidates } from '../analysis/identify.js';
import { InternalError } from '../errors.js';
import {
  commitShard,
  parseShard,
  readArray,
  sha256,
  shardItems,
  ShardData,
  printShard,
  type LoadedShard,
  type ShardInput,
  type ShardManifest,
} from './shard.js';
import { decisionWord, fitText, gapText, noiseText } from '../analysis/identifyText.js';
import { conditionGeometry } from '../geometry/conditionGeometry.js';
import { formatPlaneIn } from '../crystal/formatIndices.js';
import type { Lattice } from '../crystal/lattice.js';

export interface IdentifyCommandOptions {
  /** "<conditionId>=<file>", one per micrograph. */
  micrograph?: string[] | string;
  out?: string;
  json?: boolean;
  defect?: string | number;
  top?: string | number;
  bootstrap?: string | number;
  seed?: string | number;
  /** Progress as JSON lines on stderr. */
  progressJson?: boolean;
  /** Render threads (default: all cores). */
  threads?: number;
  /** "k/n": simulate only the k-th of n shares of the candidates and write them for `thinfoil merge` (src/cli/shard.ts). */
  shard?: string;
  /** A render pool to use (and leave open) instead of starting one (the demo shares its pool). */
  pool?: RenderPool;
}

/** Largest --bootstrap (1000 copies estimate a standard deviation to a few per cent: common practice). */
export const MAX_BOOTSTRAP = 1000;
/**
 * Largest simulated area per micrograph (crop plus the shift margin on each
 * side, after binning): every candidate is rendered on it. 768 x 768 pixels is
 * three times the default 256-pixel comparison side.
 */
export const MAX_SIMULATED_PIXELS = 768 * 768;

/** The scenario key this command reads besides the ones parseScenario knows. */
export const MICROGRAPHS_KEY = 'micrographs';
/** The scenario key with the ranges of the fitted parameters (src/analysis/fitSettings.ts). */
export const FIT_KEY = 'fit';

function intOption(name: string, v: string | number | undefined, lo: number, hi: number, fallback: number): number {
  if (v === undefined) return fallback;
  const n = typeof v === 'number' ? v : Number(v);
  if (typeof v === 'string' && v.trim() === '') throw new InputError(`${name} needs a whole number between ${lo} and ${hi}`);
  if (!Number.isInteger(n) || n < lo || n > hi) throw new InputError(`${name} "${v}" must be a whole number between ${lo} and ${hi}`);
  return n;
}

/** A micrograph argument read and decoded; `base`: the folder relative paths are read from (merge: the shards' folder). */
function readMicrograph(arg: string, base?: string): MicrographInput & { sha256: string } {
  const { conditionId, file } = parseMicrographArgument(arg);
  const bytes = readInputFile(base === undefined ? file : resolve(base, file), 'micrograph file', MAX_FILE_BYTES, ` for ${excerpt(conditionId, 40)}`);
  const img = decodeImage(bytes, `micrograph file "${excerpt(file, 80)}"`);
  return {
    conditionId,
    image: img,
    ...(img.pixel_nm === undefined ? {} : { filePixel_nm: img.pixel_nm }),
    source: file,
    synthetic: isSyntheticName(file),
    sha256: sha256(bytes),
  };
}

export interface IdentifyOutput {
  readonly result: IdentifyResult;
  readonly dir: string;
  readonly files: { readonly figurePng: string; readonly figureSvg: string; readonly report: string; readonly json: string };
}

/** Everything identify needs before simulating: the scenario, the prepared micrographs, the options, and the inputs' hashes (for shards). */
interface PreparedIdentify {
  readonly sc: ReturnType<typeof parseScenario>;
  readonly micrographs: ReturnType<typeof prepareMicrographs>;
  readonly options: { readonly defectIndex: number; readonly top: number; readonly bootstrap: number; readonly seed: number; readonly fit: FitSettings };
  readonly scenarioInput: ShardInput;
  readonly micrographInputs: (ShardInput & { readonly conditionId: string })[];
  /** The input files (refused inside the output folder). */
  readonly files: string[];
}

function prepareIdentify(scenarioFile: string, opts: IdentifyCommandOptions, base?: string): PreparedIdentify {
  const bytes = readScenarioBytes(base === undefined ? scenarioFile : resolve(base, scenarioFile));
  const raw = scenarioJsonOf(bytes, scenarioFile);
  const { [MICROGRAPHS_KEY]: micrographsRaw, [FIT_KEY]: fitRaw, ...rest } = raw;
  const sc = parseScenario(rest);
  const fit = parseFitSettings(fitRaw);
  // before the long work: a measured thickness far from the stated one (the scenario's other warnings concern the rendered view, not identify's)
  printWarnings(fitWarnings(sc, fit));
  const settings = parseMicrographSettings(micrographsRaw, sc.conditions.map((c) => c.id));
  const args = opts.micrograph === undefined ? [] : Array.isArray(opts.micrograph) ? opts.micrograph : [opts.micrograph];
  const defectIndex = intOption('--defect', opts.defect, 0, Math.max(0, sc.defects.length - 1), 0);
  const top = intOption('--top', opts.top, 1, 8, 4);
  // at least 2: the standard deviation of the gap needs two copies (0 would silently drop the noise from the verdict)
  const B = intOption('--bootstrap', opts.bootstrap, 2, MAX_BOOTSTRAP, 50);
  const seed = intOption('--seed', opts.seed, 0, 2 ** 31 - 1, 1);
  const inputs = args.map((a) => readMicrograph(a, base));
  // the direction of g on a micrograph cannot be guessed: a wrong angle ranks the wrong candidate first
  for (const m of inputs) {
    if (sc.conditions.some((c) => c.id === m.conditionId) && settings.get(m.conditionId)?.gAngle_deg === undefined) {
      throw new InputError(
        `micrographs.${m.conditionId}.gAngle_deg: is missing; give the direction of g in this micrograph in degrees, counter-clockwise from +x (from the diffraction pattern, corrected for the image rotation)`,
      );
    }
  }
  const micrographs = prepareMicrographs(sc, inputs, settings);
  for (const m of micrographs) {
    const w = m.width + 2 * m.margin;
    const h = m.height + 2 * m.margin;
    if (w * h > MAX_SIMULATED_PIXELS) {
      throw new InputError(
        `micrographs.${excerpt(m.conditionId, 40)}: each candidate would be simulated on ${w} x ${h} pixels (crop ${m.width} x ${m.height} after binning by ${m.bin}, plus ${m.margin} pixels of shift on each side), more than the limit of 768 x 768; raise "bin" or lower "maxShift_nm" or the crop`,
      );
    }
  }
  return {
    sc,
    micrographs,
    options: { defectIndex, top, bootstrap: B, seed, fit },
    scenarioInput: { path: scenarioFile, sha256: sha256(bytes) },
    micrographInputs: inputs.map((m) => ({ conditionId: m.conditionId, path: m.source, sha256: m.sha256 })),
    files: [scenarioFile, ...inputs.map((m) => m.source)].map((f) => (base === undefined ? f : resolve(base, f))),
  };
}

/** The whole command without printing; returns what it wrote. */
export async function runIdentify(scenarioFile: string, opts: IdentifyCommandOptions, onProgress?: (message: string, fraction: number) => void): Promise<IdentifyOutput> {
  const p = prepareIdentify(scenarioFile, opts);
  const dir = opts.out ?? join('out', `${slug(p.sc.name)}-identify`);
  return identifyPrepared(p, dir, opts.pool ?? opts.threads, onProgress);
}

async function identifyPrepared(
  p: PreparedIdentify,
  dir: string,
  poolOrThreads: RenderPool | number | undefined,
  onProgress?: (message: string, fraction: number) => void,
  merged?: { simulations: Float64Array[][]; renderSeconds: number },
): Promise<IdentifyOutput> {
  // checked before the work: the inputs must not lie in the folder this run replaces
  const set = OutputSet.begin(dir, { inputs: p.files });
  try {
    const out = await identifyInto(set, p.scenarioInput.path, p.sc, p.micrographs, p.options, poolOrThreads, onProgress, merged);
    set.commit();
    return out;
  } catch (e) {
    set.abort();
    throw e;
  }
}

/** Candidates of one shard: simulations only, written as shard.json and shard.bin for `thinfoil merge`. */
export async function runIdentifyShard(
  scenarioFile: string,
  opts: IdentifyCommandOptions & { shard: string },
  onProgress?: (message: string, fraction: number) => void,
): Promise<{ dir: string; manifest: ShardManifest }> {
  const shard = parseShard(opts.shard);
  const p = prepareIdentify(scenarioFile, opts);
  // the simulations identify makes: measured values (w, thickness) in place of the stated ones
  const measured = measuredInputs(p.sc, p.micrographs, p.options.fit);
  const candidates = identificationCandidates(measured.sc, p.options.defectIndex);
  const mine = shardItems(candidates.length, shard);
  const dir = opts.out ?? join('out', `${slug(p.sc.name)}-identify-shard-${shard.index}-of-${shard.count}`);
  const set = OutputSet.begin(dir, { inputs: p.files });
  try {
    const pool = createRenderPool(opts.threads);
    const t0 = performance.now();
    let sims: Float64Array[][];
    try {
      sims = await simulateCandidates(measured.sc, measured.micrographs, (s) => renderScenario(s, pool), mine, p.options.defectIndex, onProgress);
    } finally {
      await pool.close();
    }
    const seconds = (performance.now() - t0) / 1000;
    const data = new ShardData();
    const items = mine.map((k, j) => ({ index: k, label: candidates[k].label, arrays: sims[j].map((a) => data.add(a)) }));
    const bytes = data.toBytes();
    const manifest = commitShard(
      set,
      { kind: 'identify', shard, scenario: p.scenarioInput, micrographs: p.micrographInputs, options: p.options, total: candidates.length, items, seconds },
      bytes,
    );
    return { dir: set.dir, manifest };
  } catch (e) {
    set.abort();
    throw e;
  }
}

/**
 * `thinfoil merge` of identify shards: the scenario and micrographs are read
 * again (they must hold the bytes the shards were made from), the shards'
 * simulations take the place of rendering, and registration, ranking,
 * bootstrap and verdict run over all candidates as in one run.
 */
export async function mergeIdentify(shards: readonly LoadedShard[], out: string | undefined, threads: number | undefined, onProgress?: (message: string, fraction: number) => void): Promise<IdentifyOutput> {
  const m0 = shards[0].manifest;
  const o = m0.options as PreparedIdentify['options'];
  const opts: IdentifyCommandOptions = { micrograph: m0.micrographs.map((m) => `${m.conditionId}=${m.path}`), defect: o.defectIndex, top: o.top, bootstrap: o.bootstrap, seed: o.seed };
  const p = prepareIdentify(m0.scenario.path, opts, m0.cwd);
  const changed = [p.scenarioInput, ...p.micrographInputs].find((x, i) => x.sha256 !== [m0.scenario, ...m0.micrographs][i].sha256);
  if (changed !== undefined) throw new InputError(`input file "${excerpt(changed.path, 80)}" has changed since the shards were made; restore it or run the shards again`);
  const candidates = identificationCandidates(p.sc, p.options.defectIndex);
  if (m0.total !== candidates.length) throw new InternalError('merge: the shards list another number of candidates than the scenario gives');
  const sims: (Float64Array[] | undefined)[] = candidates.map(() => undefined);
  for (const s of shards) {
    const expected = shardItems(candidates.length, s.manifest.shard);
    if (s.manifest.items.length !== expected.length || s.manifest.items.some((it, j) => it.index !== expected[j] || it.label !== candidates[it.index].label)) {
      throw new InputError(`shard "${excerpt(s.dir, 60)}" does not hold the candidates its number says; run shard ${s.manifest.shard.index}/${s.manifest.shard.count} again`);
    }
    for (const it of s.manifest.items) {
      sims[it.index] = it.arrays.map((r, i) => {
        const a = readArray(s.data, r, `shard "${excerpt(s.dir, 60)}"`);
        const mg = p.micrographs[i];
        if (!(a instanceof Float64Array) || mg === undefined || a.length !== (mg.width + 2 * mg.margin) * (mg.height + 2 * mg.margin)) {
          throw new InputError(`shard "${excerpt(s.dir, 60)}": a simulation does not have the size of its micrograph; run shard ${s.manifest.shard.index}/${s.manifest.shard.count} again`);
        }
        return a;
      });
    }
  }
  const renderSeconds = shards.reduce((t, s) => t + s.manifest.seconds, 0);
  const dir = out ?? join('out', `${slug(p.sc.name)}-identify`);
  return identifyPrepared(p, dir, threads, onProgress, { simulations: sims as Float64Array[][], renderSeconds });
}

async function identifyInto(
  set: OutputSet,
  scenarioFile: string,
  sc: ReturnType<typeof parseScenario>,
  micrographs: ReturnType<typeof prepareMicrographs>,
  o: { defectIndex: number; top: number; bootstrap: number; seed: number; fit: FitSettings },
  /** a pool to use and leave open, or the number of threads of a pool started (and closed) here */
  poolOrThreads: RenderPool | number | undefined,
  onProgress?: (message: string, fraction: number) => void,
  merged?: { simulations: Float64Array[][]; renderSeconds: number },
): Promise<IdentifyOutput> {
  const { defectIndex, top, bootstrap: B, seed } = o;

  // a merge of shards renders only the fits of the leading candidates (the pool starts its workers when first used)
  const own = typeof poolOrThreads !== 'object';
  const pool = typeof poolOrThreads === 'object' ? poolOrThreads : createRenderPool(poolOrThreads);
  let result: IdentifyResult;
  try {
    result = await identify(
      sc,
      micrographs,
      (s) => renderScenario(s, pool),
      {
        defectIndex,
        top,
        bootstrap: B,
        seed,
        fit: o.fit,
        ...(onProgress ? { onProgress } : {}),
        ...(merged ? { simulations: merged.simulations } : {}),
      },
    );
  } finally {
    if (own) await pool.close();
  }
  // the render time of a merged run is the shards' (summed)
  if (merged) result = { ...result, seconds: { ...result.seconds, render: merged.renderSeconds } };

  const fig = comparisonFigure(comparisonFigureData(result));
  const files = {
    figurePng: set.finalPath('identify-figure.png'),
    figureSvg: set.finalPath('identify-figure.svg'),
    report: set.finalPath('identify-report.html'),
    json: set.finalPath('identify.json'),
  };
  const w = (path: string, data: Uint8Array | string) => set.write(basename(path), data);
  w(files.figurePng, fig.png);
  w(files.figureSvg, fig.svg);
  w(files.report, identifyReportHtml(result, { scenarioFile: basename(scenarioFile), absorption: describeAbsorption(sc.absorption), figurePng: fig.png, figureFiles: [basename(files.figurePng), basename(files.figureSvg)] }));
  w(files.json, `${jsonText(resultJson(result, files, sc.material.lattice), 2)}\n`);
  return { result, dir: set.dir, files };
}

/** The JSON form of a result (what --json prints, plus details in identify.json). */
/** The JSON form of a result; with the lattice, each condition also gets its geometry in crystal terms. */
export function resultJson(res: IdentifyResult, files?: IdentifyOutput['files'], lattice?: Lattice) {
  return {
    scenario: res.scenario,
    note: 'Simulated images are a model, not a measurement.',
    synthetic: res.micrographs.filter((m) => m.synthetic).map((m) => m.conditionId),
    defect: { index: res.defectIndex, label: res.defectLabel },
    ranking: res.ranking.map((r) => ({
      candidate: r.candidate,
      kind: r.kind,
      score: r.score,
      amplitude: r.amplitude,
      ...(r.fit ? { fit: r.fit } : {}),
      perCondition: r.perCondition.map((p) => ({
        condition: p.condition,
        r2: p.r2,
        ncc: p.ncc,
        amplitude: p.amplitude,
        shift_nm: p.shift_nm,
        rotation_deg: p.rotation_deg,
        scale: p.scale,
        visibility: p.visibility,
      })),
    })),
    verdict: {
      decision: res.verdict.decision,
      best: res.verdict.best,
      runnerUp: res.verdict.runnerUp,
      gap: res.verdict.gap,
      gapSigma: res.verdict.gapSigma,
      threshold: res.verdict.threshold,
      modelSpread: res.verdict.modelSpread,
      indistinguishable: res.verdict.indistinguishable,
      comparisons: res.verdict.comparisons,
      statement: res.verdict.statement,
      rule: res.verdict.rule,
    },
    absolute: res.absolute,
    flags: res.flags,
    conditions: res.micrographs.map((m) => ({
      id: m.conditionId,
      g: m.condition.g,
      field: m.settings.field,
      xi_nm: m.resolved.xi_nm,
      xiAbs_nm: m.resolved.xiAbs_nm,
      s_per_nm: m.resolved.s_per_nm,
      w: m.resolved.w,
      thickness_nm: m.resolved.frame.thickness_nm,
      micrograph: m.source,
      synthetic: m.synthetic,
      pixel_nm: m.pixel_nm,
      bin: m.bin,
      crop: m.crop,
      gAngle_deg: m.gAngle_deg,
      ...(lattice === undefined ? {} : { geometry: identifyGeometry(lattice, m) }),
    })),
    settings: res.settings,
    seconds: res.seconds,
    ...(files ? { files } : {}),
  };
}

/** Beam, foil normal, nearest zone and reflection of a micrograph's condition (four indices for hexagonal crystals). */
function identifyGeometry(lattice: Lattice, m: IdentifyResult['micrographs'][number]) {
  const g = conditionGeometry(lattice, m.resolved.frame, m.resolved.g_cart);
  return {
    reflection: formatPlaneIn(lattice, m.condition.g),
    beam: g.text.beam,
    foilNormal: g.text.foilNormal,
    nearestZone: { axis: g.nearestZone.text, angle_deg: g.nearestZone.angle_deg },
    gAngleMicrograph_deg: m.gAngle_deg,
    note: 'gAngleMicrograph_deg is the direction of g in the micrograph as given in its settings (counter-clockwise from +x, +y down)',
  };
}

export async function identifyCommand(scenarioFile: string, opts: IdentifyCommandOptions): Promise<void> {
  const bar = progressBar({ jsonLines: opts.progressJson === true });
  const update = (msg: string, f: number) => bar.update(msg.length > 48 ? `${msg.slice(0, 45)}...` : msg, f);
  if (opts.shard !== undefined) {
    let shard: Awaited<ReturnType<typeof runIdentifyShard>>;
    try {
      shard = await runIdentifyShard(scenarioFile, { ...opts, shard: opts.shard }, update);
    } finally {
      bar.done();
    }
    printShard(shard.dir, shard.manifest, opts.json === true);
    return;
  }
  let out: IdentifyOutput;
  try {
    out = await runIdentify(scenarioFile, opts, update);
  } finally {
    bar.done();
  }
  printIdentify(out, opts.json === true);
}

/** What identify (and merge of identify shards) prints. */
export function printIdentify(out: IdentifyOutput, json: boolean): void {
  const { result: res, files, dir } = out;
  if (json) {
    const j = resultJson(res, files);
    printJson({
      // the ranking as in identify.json without the per-pixel detail; a fitted candidate carries its "fit" there too
      ranking: j.ranking.map(({ candidate, score, perCondition, fit }) => ({ candidate, score, perCondition, ...(fit === undefined ? {} : { fit }) })),
      verdict: j.verdict,
      synthetic: j.synthetic,
      absolute: j.absolute,
      flags: j.flags,
      files,
    });
    return;
  }
  process.stdout.write(formatIdentify(out));
  process.stdout.write(`written to ${resolve(dir)}: ${basename(files.figurePng)}, ${basename(files.figureSvg)}, ${basename(files.report)}, ${basename(files.json)}\n`);
}

/** The ranking, verdict and rule as text (what `identify` prints without --json). */
export function formatIdentify(out: IdentifyOutput): string {
  const res = out.result;
  const parts: string[] = [];
  const synth = res.micrographs.filter((m) => m.synthetic);
  if (synth.length > 0) parts.push(`NOTE: ${synth.map((m) => m.source).join(', ')} ${synth.length === 1 ? 'is a SYNTHETIC micrograph' : 'are SYNTHETIC micrographs'} (not measured).\n`);
  parts.push(`${res.scenario}: ${res.defectLabel}, ${res.candidates.length} candidates, ${res.micrographs.length} micrograph(s)\n\n`);
  const ids = res.micrographs.map((m) => m.conditionId);
  const cmp = new Map(res.verdict.comparisons.map((c) => [c.candidate, c]));
  parts.push(table(
    ['#', 'candidate', 'score', 'gap', 'needed', 'status', ...ids.map((id) => `R2 ${id}`), ...ids.map((id) => `g.b ${id}`)],
    res.ranking.map((r, i) => {
      const c = cmp.get(r.candidate);
      const status = i === 0 ? (res.verdict.decision === 'identified' ? 'identified' : 'best') : c?.excluded ? 'excluded' : 'not excluded';
      return [
        String(i + 1),
        r.candidate,
        sig(r.score, 3),
        gapText(c?.gap),
        gapText(c?.threshold),
        status,
        ...r.perCondition.map((p) => sig(p.r2, 3)),
        ...r.perCondition.map((p) => (p.visibility.value === undefined ? '-' : sig(p.visibility.value, 3))),
      ];
    }),
  ));
  parts.push('R2: fraction of a micrograph\'s contrast variance explained by the registered simulation (negative: worse than a flat image, e.g. contrast predicted where there is none). gap: score below the best; needed: the gap that excludes it (rule below).\n');
  const fitted = res.ranking.filter((r) => r.fit);
  if (fitted.length > 0) {
    parts.push('\nfitted parameters (each within the range stated; see "fit" in the scenario):\n');
    for (const r of fitted) parts.push(`  ${r.candidate}: ${fitText(r.fit!)}\n`);
  } else parts.push('\nnuisance parameters: not fitted (as stated in the scenario).\n');
  parts.push(`\nnoise and residual of the best candidate (${res.ranking[0].candidate}):\n`);
  for (const p of res.absolute.perMicrograph) parts.push(`  ${p.condition}: ${noiseText(p)}\n`);
  parts.push(`  ${res.absolute.method}\n`);
  if (res.flags.length > 0) {
    parts.push('\nflagged micrographs:\n');
    for (const f of res.flags) parts.push(`  ${f.message}\n`);
  }
  parts.push(`\n${decisionWord(res.verdict.decision)}: ${res.verdict.statement}\n`);
  parts.push(`rule: ${res.verdict.rule}\n`);
  return parts.join('');
}
