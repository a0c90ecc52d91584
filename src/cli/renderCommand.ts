/** `thinfoil render <scenario>`: bright- and dark-field images of every condition. */
import { jsonText } from '../output/json.js';
import { join, resolve } from 'node:path';
import type { Scenario } from '../scenario/types.js';
import { InputError } from '../errors.js';
import { renderScenario, type ConditionImages } from '../imaging/renderScenario.js';
import { createRenderPool, type RenderPool } from '../imaging/workerPool.js';
import { writeConditionImages, type ImageEntry } from '../output/imageFiles.js';
import { OutputSet } from '../output/outputSet.js';
import { encodeGreyPng } from '../output/png.js';
import { loadScenario, readScenarioBytes, scenarioJsonOf, warnAbout } from './loadScenario.js';
import { parseScenario } from '../scenario/parse.js';
import { resolveCondition } from '../imaging/resolveCondition.js';
import { excerpt, InternalError } from '../errors.js';
import { MAX_SCENARIO_BYTES } from './readInput.js';
import { commitShard, parseShard, printShard, readArray, readRecordedInput, sha256, shardItems, ShardData, type LoadedShard, type ShardManifest } from './shard.js';
import { slug } from './slug.js';
import { printJson, sig, table } from './run.js';
import { progressBar } from './progress.js';
import { conditionFigure, contactSheet, contrastNote, displayWindows, type ContrastMode } from '../output/renderFigures.js';
import { conditionGeometry } from '../geometry/conditionGeometry.js';
import { formatPlaneIn } from '../crystal/formatIndices.js';
import { blurImages } from '../analysis/pointSpread.js';
import { describeAbsorption } from '../scattering/absorption.js';
import { describeElasticity } from '../elasticity/elasticityNote.js';
import { describeSurfaces } from '../imaging/surfaceNote.js';

export interface RenderOptions {
  out?: string;
  json?: boolean;
  progressJson?: boolean;
  contrast?: ContrastMode;
  blurNm?: number;
  /** Integrate every column on its own (no translation method). */
  eachColumn?: boolean;
  /** "k/n": render only the k-th of n shares of the conditions and write them for `thinfoil merge` (src/cli/shard.ts). */
  shard?: string;
}

/** How the images are shown and blurred (render and demo). */
export interface ImageOptions {
  /** Grey scale of the figures: one scale shared by all conditions (default) or each image on its own. */
  readonly contrast: ContrastMode;
  /** Standard deviation (nm) of a Gaussian point spread applied to the simulated intensities; 0: none. */
  readonly blur_nm: number;
  /** Let columns of straight defects share one long column (translation method); false integrates every column on its own. Default true. */
  readonly shareColumns?: boolean;
}

export const DEFAULT_IMAGE_OPTIONS: ImageOptions = { contrast: 'shared', blur_nm: 0 };

/**
 * Render a scenario and write its images, figures and render.json (with the
 * scenario's warnings) into an output set (not committed here); shared by
 * `render` and `demo`.
 */
export async function renderAndWrite(
  sc: Scenario,
  set: OutputSet,
  showProgress: boolean | Parameters<typeof progressBar>[0],
  warnings: readonly string[] = [],
  opts: ImageOptions = DEFAULT_IMAGE_OPTIONS,
  /** a pool to use and leave open (the demo shares one); otherwise one is started and closed here */
  shared?: RenderPool,
): Promise<{ images: ConditionImages[]; entries: ImageEntry[]; figures: string[]; seconds: number }> {
  const t0 = performance.now();
  const raw = await renderImages(sc, showProgress, opts, shared);
  return writeRenderSet(sc, set, raw, warnings, opts, (performance.now() - t0) / 1000);
}

/** The unblurred images of every condition of `sc` (a shard passes a scenario holding only its conditions). */
async function renderImages(
  sc: Scenario,
  showProgress: boolean | Parameters<typeof progressBar>[0],
  opts: ImageOptions,
  /** a pool to use and leave open; otherwise one is started and closed here */
  shared?: RenderPool,
): Promise<ConditionImages[]> {
  const bar = progressBar(showProgress);
  const pool = shared ?? createRenderPool();
  try {
    return await renderScenario(sc, pool, (i, d, t) => bar.update(`rendering ${sc.conditions[i].id} (${i + 1}/${sc.conditions.length})`, d / t), undefined, opts.shareColumns !== false);
  } finally {
    bar.done();
    if (shared === undefined) await pool.close();
  }
}

/**
 * The output set of a render from its unblurred images (of all conditions):
 * point spread, PNG/TIFF, figures, contact sheet, core masks, render.json.
 * `seconds` is the render time reported back (merge: the shards' sum).
 */
function writeRenderSet(
  sc: Scenario,
  set: OutputSet,
  raw: ConditionImages[],
  warnings: readonly string[],
  opts: ImageOptions,
  renderSeconds: number,
): { images: ConditionImages[]; entries: ImageEntry[]; figures: string[]; seconds: number } {
  const t0 = performance.now();
  const images = opts.blur_nm > 0 ? blurImages(raw, opts.blur_nm) : raw;
  const seconds = renderSeconds + (performance.now() - t0) / 1000;
  const entries = writeConditionImages((name, data) => set.write(name, data), images, sc.name);
  const geometries = images.map((ci) => conditionGeometry(sc.material.lattice, ci.condition.frame, ci.condition.g_cart));
  const { windows, scales } = displayWindows(images, opts.contrast);
  const note = contrastNote(scales, windows) + (opts.blur_nm > 0 ? ` Images blurred by a Gaussian point spread of standard deviation ${opts.blur_nm} nm.` : '');
  const figures: string[] = [];
  const writeFigure = (base: string, fig: { png: Uint8Array; svg: string }) => {
    figures.push(set.write(`${base}.png`, fig.png), set.write(`${base}.svg`, fig.svg));
  };
  images.forEach((ci, i) => writeFigure(`${ci.condition.id}-figure`, conditionFigure(ci, geometries[i], windows[i], note, sc.name)));
  writeFigure('contact-sheet', contactSheet(images, geometries, windows, note, sc.name));
  const masks = images.map((ci) => writeCoreMask(set, ci));
  const el = describeElasticity(sc);
  const surfaces = describeSurfaces(sc);
  const summary = {
    scenario: sc.name,
    note: `Simulated images (column approximation, ${el.model} elasticity, ${surfaces.setting === 'relaxed' ? 'relaxed foil surfaces' : 'infinite medium'}); a model, not a measurement.`,
    material: sc.material.name,
    elasticity: el,
    surfaces,
    kV: sc.kV,
    thickness_nm: sc.thickness_nm,
    absorption: { setting: sc.absorption, model: describeAbsorption(sc.absorption) },
    pointSpread_nm: opts.blur_nm,
    figures: {
      files: figures,
      contrast: opts.contrast,
      note,
      windows: images.map((ci, i) => ({ condition: ci.condition.id, bf: windows[i][0], df: windows[i][1] })),
    },
    conditions: images.map((ci, i) => ({ ...conditionSummary(ci), geometry: conditionGeometryJson(sc, ci, geometries[i]), ...(masks[i] === null ? {} : { corePixels: masks[i] }) })),
    images: entries,
    warnings,
  };
  set.write('render.json', `${jsonText(summary, 2)}\n`);
  return { images, entries, figures, seconds };
}

/** The geometry block of one condition in render.json (directions as crystal indices, largest |index| 1). */
function conditionGeometryJson(sc: Scenario, ci: ConditionImages, g: ReturnType<typeof conditionGeometry>) {
  return {
    reflection: formatPlaneIn(sc.material.lattice, ci.condition.g),
    gAngle_deg: g.gAngle_deg,
    gAngleConvention: 'degrees counter-clockwise from +x, +y pointing down in the image',
    imageX: g.imageX,
    imageY: g.imageY,
    beam: g.beam,
    foilNormal: g.foilNormal,
    text: g.text,
    nearestZone: { axis: g.nearestZone.text, angle_deg: g.nearestZone.angle_deg },
  };
}

/**
 * Writes `<id>-core.png` (white: pixels whose area reaches a dislocation core) when there are such pixels;
 * returns what render.json says about them, or null.
 */
function writeCoreMask(set: OutputSet, ci: ConditionImages): { count: number; mask: string; note: string } | null {
  let count = 0;
  const px = new Uint8Array(ci.coreMask.length);
  for (let i = 0; i < px.length; i++) {
    if (ci.coreMask[i]) {
      px[i] = 255;
      count++;
    }
  }
  if (count === 0) return null;
  const file = set.write(`${ci.condition.id}-core.png`, encodeGreyPng(px, ci.width, ci.height));
  return {
    count,
    mask: file,
    note: 'pixels whose area reaches 2 core radii of a dislocation line (column approximation and linear elasticity fail there): each is the mean over its area outside the core, or of the columns just outside it; not a prediction of core contrast',
  };
}

export function conditionSummary(ci: ConditionImages) {
  const c = ci.condition;
  return {
    id: c.id,
    g: c.g,
    beam: c.beamDirection,
    xi_nm: c.xi_nm,
    xiAbs_nm: c.xiAbs_nm,
    xiAbs0_nm: c.xiAbs0_nm,
    s_per_nm: c.s_per_nm,
    w: c.w,
    deviationFrom: c.deviationSource,
    columnLength_nm: c.frame.columnLength_nm,
    background: ci.background,
  };
}

/**
 * Cost of a render in column-defect pairs (pixels x conditions x defects).
 * Measured here: 100 straight dislocations on 32 x 32 pixels, one condition
 * (102,400 pairs) took 52 s on 2 busy cores, about 2,000 pairs per second.
 * The rate depends on much more than the pair count: the demo scenario's 5.7e5
 * pairs (7 defects, two-beam, column by column because of its loops) took
 * 19 CPU s in one run here (about 30,000 pairs per CPU second), while 10
 * inclined lines with relaxed surfaces, a 9-beam row and a 300 nm foil ran at
 * about 1,000 pairs per second on 2 cores. The warning names the rate it assumes.
 */
export const PAIRS_PER_SECOND = 2000;
/** Above this a warning with an estimate is printed before starting; above MAX_PAIRS the render is refused. */
export const WARN_PAIRS = 500_000;
export const MAX_PAIRS = 20_000_000;

export function costWarning(sc: Scenario): string | undefined {
  const pairs = sc.image.width_px * sc.image.height_px * sc.conditions.length * sc.defects.length;
  const minutes = pairs / PAIRS_PER_SECOND / 60;
  const text = `${sc.image.width_px} x ${sc.image.height_px} pixels x ${sc.conditions.length} condition(s) x ${sc.defects.length} defect(s) = ${pairs.toExponential(1)} column-defect pairs`;
  if (pairs > MAX_PAIRS) {
    throw new InputError(`the scenario asks for ${text}, about ${Math.round(minutes / 60)} hours here (limit ${MAX_PAIRS.toExponential(0)}); use fewer pixels, conditions or defects`);
  }
  if (pairs > WARN_PAIRS) return `${text}; at ${PAIRS_PER_SECOND} pairs per second (two-beam, many lines column by column, 2 cores) that is about ${minutes < 2 ? `${Math.round(minutes * 60)} s` : `${Math.round(minutes)} min`}; many beams, relaxed surfaces and thick foils are slower, a few defects or shared columns faster`;
  return undefined;
}

function imageOptionsOf(opts: RenderOptions): ImageOptions {
  return { contrast: opts.contrast ?? 'shared', blur_nm: opts.blurNm ?? 0, shareColumns: opts.eachColumn !== true };
}

export async function renderCommand(file: string, opts: RenderOptions): Promise<void> {
  if (opts.shard !== undefined) {
    const { dir, manifest } = await renderShard(file, { ...opts, shard: opts.shard });
    printShard(dir, manifest, opts.json === true);
    return;
  }
  const sc = loadScenario(file);
  const cost = costWarning(sc);
  const warnings = warnAbout(sc, cost === undefined ? [] : [cost]);
  const dir = opts.out ?? join('out', slug(sc.name));
  const set = OutputSet.begin(dir, { inputs: [file] });
  let result: Awaited<ReturnType<typeof renderAndWrite>>;
  try {
    result = await renderAndWrite(sc, set, { jsonLines: opts.progressJson === true }, warnings, imageOptionsOf(opts));
    set.commit();
  } catch (e) {
    set.abort();
    throw e;
  }
  printRender(sc, dir, result, warnings, opts.json === true);
}

/** The options of a render that shape its output (the fingerprint of its shards). */
function renderShardOptions(opts: RenderOptions): Record<string, unknown> {
  return { contrast: opts.contrast ?? 'shared', blurNm: opts.blurNm ?? 0, eachColumn: opts.eachColumn === true };
}

/** One shard of a render: the unblurred images of its conditions, written as shard.json and shard.bin for `thinfoil merge`. */
export async function renderShard(file: string, opts: RenderOptions & { shard: string }): Promise<{ dir: string; manifest: ShardManifest }> {
  const shard = parseShard(opts.shard);
  const bytes = readScenarioBytes(file);
  const sc = parseScenario(scenarioJsonOf(bytes, file));
  const cost = costWarning(sc);
  warnAbout(sc, cost === undefined ? [] : [cost]);
  const mine = shardItems(sc.conditions.length, shard);
  const dir = opts.out ?? join('out', `${slug(sc.name)}-shard-${shard.index}-of-${shard.count}`);
  const set = OutputSet.begin(dir, { inputs: [file] });
  try {
    const t0 = performance.now();
    const images = await renderImages({ ...sc, conditions: mine.map((i) => sc.conditions[i]) }, { jsonLines: opts.progressJson === true }, imageOptionsOf(opts));
    const seconds = (performance.now() - t0) / 1000;
    const data = new ShardData();
    const items = images.map((ci, j) => ({
      index: mine[j],
      label: ci.condition.id,
      arrays: [data.add(ci.bf), data.add(ci.df), data.add(ci.coreMask)],
      extra: { width: ci.width, height: ci.height, pixel_nm: ci.pixel_nm, background: ci.background, slices: ci.slices },
    }));
    const out = data.toBytes();
    const scenario = { path: file, sha256: sha256(bytes) };
    const options = renderShardOptions(opts);
    const manifest = commitShard(set, { kind: 'render', shard, scenario, micrographs: [], options, total: sc.conditions.length, items, seconds }, out);
    return { dir: set.dir, manifest };
  } catch (e) {
    set.abort();
    throw e;
  }
}

/** `thinfoil merge` of render shards: the output set one render of the scenario would write. */
export async function mergeRender(shards: readonly LoadedShard[], out: string | undefined, json: boolean): Promise<void> {
  const m0 = shards[0].manifest;
  const bytes = readRecordedInput(m0.cwd, m0.scenario, 'scenario file', MAX_SCENARIO_BYTES);
  const sc = parseScenario(scenarioJsonOf(bytes, m0.scenario.path));
  if (m0.total !== sc.conditions.length) throw new InternalError('merge: the shards list another number of conditions than the scenario gives');
  const o = m0.options as { contrast: ContrastMode; blurNm: number; eachColumn: boolean };
  const opts = { contrast: o.contrast, blur_nm: o.blurNm, shareColumns: !o.eachColumn };
  const images: (ConditionImages | undefined)[] = sc.conditions.map(() => undefined);
  const n = sc.image.width_px * sc.image.height_px;
  for (const s of shards) {
    const expected = shardItems(sc.conditions.length, s.manifest.shard);
    const where = `shard "${excerpt(s.dir, 60)}"`;
    const again = `run shard ${s.manifest.shard.index}/${s.manifest.shard.count} again`;
    if (s.manifest.items.length !== expected.length || s.manifest.items.some((it, j) => it.index !== expected[j] || it.label !== sc.conditions[it.index].id)) {
      throw new InputError(`${where} does not hold the conditions its number says; ${again}`);
    }
    for (const it of s.manifest.items) {
      const [bf, df, mask] = it.arrays.map((r) => readArray(s.data, r, where));
      const x = it.extra as { background: { bf: number; df: number }; slices: number };
      if (!(bf instanceof Float32Array) || !(df instanceof Float32Array) || !(mask instanceof Uint8Array) || bf.length !== n || df.length !== n || mask.length !== n) {
        throw new InputError(`${where}: the images of ${it.label} do not have the scenario's size; ${again}`);
      }
      images[it.index] = {
        condition: resolveCondition(sc, sc.conditions[it.index]),
        width: sc.image.width_px,
        height: sc.image.height_px,
        pixel_nm: sc.image.pixel_nm,
        bf,
        df,
        background: x.background,
        slices: x.slices,
        coreMask: mask,
      };
    }
  }
  const cost = costWarning(sc);
  const warnings = warnAbout(sc, cost === undefined ? [] : [cost]);
  const dir = out ?? join('out', slug(sc.name));
  const set = OutputSet.begin(dir, { inputs: [resolve(m0.cwd, m0.scenario.path)] });
  let result: ReturnType<typeof writeRenderSet>;
  try {
    const seconds = shards.reduce((t, s) => t + s.manifest.seconds, 0);
    result = writeRenderSet(sc, set, images as ConditionImages[], warnings, opts, seconds);
    set.commit();
  } catch (e) {
    set.abort();
    throw e;
  }
  printRender(sc, dir, result, warnings, json);
}

/** What render (and merge of render shards) prints. */
function printRender(sc: Scenario, dir: string, result: Awaited<ReturnType<typeof renderAndWrite>>, warnings: readonly string[], json: boolean): void {
  const { images, entries, figures, seconds } = result;
  if (json) {
    printJson({ images: entries.map(({ stretch, ...e }) => ({ ...e, stretch })), figures, warnings });
    return;
  }
  process.stdout.write(`${sc.name}: ${images.length} condition(s), ${sc.image.width_px} x ${sc.image.height_px} px at ${sc.image.pixel_nm} nm, ${sig(seconds, 3)} s\n`);
  process.stdout.write(table(
    ['condition', 'g', 'xi_g (nm)', 's (1/nm)', 'w', 'field', 'min', 'max', 'background', 'file'],
    entries.map((e) => {
      const ci = images.find((i) => i.condition.id === e.condition)!;
      return [e.condition, `(${ci.condition.g.join(' ')})`, sig(ci.condition.xi_nm, 4), sig(ci.condition.s_per_nm, 3), sig(ci.condition.w, 3), e.field, sig(e.min, 4), sig(e.max, 4), sig(e.background, 4), e.png];
    }),
  ));
  process.stdout.write(`written to ${dir} (PNG for viewing, float TIFF with intensities, annotated figures <id>-figure.png/.svg and contact-sheet.png/.svg, render.json)\n`);
}
