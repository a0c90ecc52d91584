/** `thinfoil render <scenario>`: bright- and dark-field images of every condition. */
import { join } from 'node:path';
import type { Scenario } from '../scenario/types.js';
import { renderScenario, type ConditionImages } from '../imaging/renderScenario.js';
import { createRenderPool } from '../imaging/workerPool.js';
import { writeConditionImages, type ImageEntry } from '../output/imageFiles.js';
import { ensureOutputDir, writeFileAtomic } from '../output/atomicWrite.js';
import { loadScenario } from './loadScenario.js';
import { scenarioWarnings } from '../analysis/scenarioWarnings.js';
import { printJson, sig, table } from './run.js';
import { progressBar } from './progress.js';

export interface RenderOptions {
  out?: string;
  json?: boolean;
  /** Integrate every column on its own (no translation method). */
  eachColumn?: boolean;
}

export function slug(name: string): string {
  return name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '') || 'scenario';
}

/** Render a scenario and write its images; shared by `render` and `demo`. */
export async function renderAndWrite(sc: Scenario, dir: string, showProgress: boolean, shareColumns = true): Promise<{ images: ConditionImages[]; entries: ImageEntry[]; seconds: number }> {
  ensureOutputDir(dir);
  const bar = progressBar(showProgress);
  const pool = createRenderPool();
  const t0 = performance.now();
  let images: ConditionImages[];
  try {
    images = await renderScenario(sc, pool, (i, d, t) => bar.update(`rendering ${sc.conditions[i].id} (${i + 1}/${sc.conditions.length})`, d / t), undefined, shareColumns);
  } finally {
    bar.done();
    await pool.close();
  }
  const seconds = (performance.now() - t0) / 1000;
  const entries = writeConditionImages(dir, images, sc.name);
  const summary = {
    scenario: sc.name,
    note: 'Simulated images (column approximation, isotropic elasticity); a model, not a measurement.',
    material: sc.material.name,
    kV: sc.kV,
    thickness_nm: sc.thickness_nm,
    conditions: images.map((ci) => conditionSummary(ci)),
    images: entries,
  };
  writeFileAtomic(join(dir, 'render.json'), `${JSON.stringify(summary, null, 2)}\n`);
  return { images, entries, seconds };
}

export function conditionSummary(ci: ConditionImages) {
  const c = ci.condition;
  return {
    id: c.id,
    g: c.g,
    beam: c.beamDirection,
    xi_nm: c.xi_nm,
    xiAbs_nm: c.xiAbs_nm,
    s_per_nm: c.s_per_nm,
    w: c.w,
    deviationFrom: c.deviationSource,
    columnLength_nm: c.frame.columnLength_nm,
    background: ci.background,
  };
}

export async function renderCommand(file: string, opts: RenderOptions): Promise<void> {
  const sc = loadScenario(file);
  const warnings = scenarioWarnings(sc);
  for (const w of warnings) process.stderr.write(`thinfoil: warning: ${w}\n`);
  const dir = opts.out ?? join('out', slug(sc.name));
  const { images, entries, seconds } = await renderAndWrite(sc, dir, !opts.json, opts.eachColumn !== true);
  if (opts.json) {
    printJson({ images: entries.map(({ stretch, ...e }) => ({ ...e, stretch })), warnings });
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
  process.stdout.write(`written to ${dir} (PNG for viewing, float TIFF with intensities, render.json)\n`);
}
