/** `thinfoil demo`: renders the built-in invented scenario and prints what it found. */
import { jsonText } from '../output/json.js';
import { join } from 'node:path';
import { DEMO_SCENARIO } from '../scenario/demo.js';
import { parseScenario } from '../scenario/parse.js';
import { indicesWithFraction } from '../crystal/formatIndices.js';
import { visibilityTable } from '../analysis/visibilityTable.js';
import { OutputSet } from '../output/outputSet.js';
import { DEFAULT_IMAGE_OPTIONS, renderAndWrite } from './renderCommand.js';
import { formatVisibility } from './visibilityCommand.js';
import { sig, table } from './run.js';
import { faultReport, formatFaults, formatInclusions } from './faultCommand.js';
import { dissociationWidth_nm } from '../defects/dissociated.js';
import { loopNature } from '../defects/loop.js';
import { DEMO_HIDDEN_CANDIDATE, DEMO_IDENTIFY_SCENARIO, DEMO_MICROGRAPHS, DEMO_SYNTHESIS } from '../scenario/demoIdentify.js';
import { identificationCandidates } from '../analysis/candidates.js';
import { syntheticFileName, syntheticMicrographs } from '../analysis/synthetic.js';
import { renderScenario } from '../imaging/renderScenario.js';
import { createRenderPool, type RenderPool } from '../imaging/workerPool.js';
import { encodeFloatTiff } from '../output/tiff.js';
import { formatIdentify, runIdentify } from './identifyCommand.js';

export async function demoCommand(opts: { out?: string; size?: number }): Promise<void> {
  const dir = opts.out ?? join('out', 'demo');
  const side = opts.size ?? DEMO_SCENARIO.image.width_px;
  // --size keeps the field of view: the pixel grows as the image shrinks
  const demo = side === DEMO_SCENARIO.image.width_px ? DEMO_SCENARIO : { ...DEMO_SCENARIO, image: { width_px: side, height_px: side, pixel_nm: (DEMO_SCENARIO.image.pixel_nm * DEMO_SCENARIO.image.width_px) / side } };
  const sc = parseScenario(demo);
  process.stdout.write(`thinfoil demo: ${sc.name}\n`);
  process.stdout.write('All data in this demo are invented; the images are simulations (a model), not measurements.\n\n');
  // one pool for the whole demo: its workers start (and warm up) once
  const pool = createRenderPool();
  try {
    const set = OutputSet.begin(dir);
    try {
      await demoMain(sc, demo, set, pool);
      set.commit();
    } catch (e) {
      set.abort();
      throw e;
    }
    process.stdout.write(`\nwritten to ${dir}: <condition>-bf.png / -df.png (viewing), .tif (float intensities), <condition>-figure.png and contact-sheet.png (annotated), render.json, visibility.txt\n`);
    await demoIdentification(dir, pool);
  } finally {
    await pool.close();
  }
}

async function demoMain(sc: ReturnType<typeof parseScenario>, demo: object, set: OutputSet, pool: RenderPool): Promise<void> {
  set.write('scenario.json', `${jsonText(demo, 2)}\n`);
  const { images, entries, seconds } = await renderAndWrite(sc, set, true, [], DEFAULT_IMAGE_OPTIONS, pool);
  process.stdout.write(
    `material ${sc.material.name}, ${sc.kV} kV, foil ${sc.thickness_nm} nm, ${sc.image.width_px} x ${sc.image.height_px} px at ${sc.image.pixel_nm} nm; ` +
      `${images.length} conditions rendered in ${sig(seconds, 3)} s\n\n`,
  );
  process.stdout.write(table(
    ['condition', 'g', 'xi_g (nm)', "xi'_g (nm)", 's (1/nm)', 'w', 'BF background', 'BF min..max', 'DF background', 'DF min..max'],
    images.map((ci) => {
      const bf = entries.find((e) => e.condition === ci.condition.id && e.field === 'bf')!;
      const df = entries.find((e) => e.condition === ci.condition.id && e.field === 'df')!;
      const c = ci.condition;
      return [c.id, `(${c.g.join(' ')})`, sig(c.xi_nm, 4), sig(c.xiAbs_nm, 4), sig(c.s_per_nm, 3), sig(c.w, 3), sig(bf.background, 3), `${sig(bf.min, 3)}..${sig(bf.max, 3)}`, sig(df.background, 3), `${sig(df.min, 3)}..${sig(df.max, 3)}`];
    }),
  ));
  const vis = visibilityTable(sc);
  const visText = formatVisibility(sc, vis);
  set.write('visibility.txt', visText);
  set.write('visibility.json', `${jsonText({ scenario: sc.name, rows: vis }, 2)}\n`);
  process.stdout.write(`\nvisibility (simulated strip across each line, patch over each loop, g.b rule beside it):\n${visText}`);
  for (const d of sc.defects) {
    if (d.type === 'dissociated') {
      process.stdout.write(`\n${d.label}: partial separation ${sig(dissociationWidth_nm(sc.material, d, undefined, sc.elasticity), 3)} nm (${sc.elasticity} equilibrium width for ${sc.material.stackingFaultEnergy_mJ_per_m2} mJ/m^2)\n`);
    }
    if (d.type === 'loop') {
      const gb = sc.conditions.map((c) => `${c.id} ${sig(c.g[0] * d.b[0] + c.g[1] * d.b[1] + c.g[2] * d.b[2], 3)}`).join(', ');
      const fault = d.fault === undefined ? 'no fault' : `encloses a fault with R = b (${d.fault.nature})`;
      process.stdout.write(`\n${d.label}: ${loopNature(sc.material, d)} loop, b = ${indicesWithFraction(d.b)}, ${fault}; g.b: ${gb} (isotropic infinite-medium field)\n`);
    }
  }
  // loop read-outs render every loop several times per condition: `thinfoil nature` gives them
  const fr = faultReport(sc, undefined, { loops: false });
  const frText = formatFaults(fr.faults) + formatInclusions(fr.inclusions);
  if (frText) {
    set.write('faults-and-inclusions.txt', frText);
    process.stdout.write(`\nfault nature and misfit sign read-outs (simulated):\n${frText}`);
  }
  if (sc.defects.some((d) => d.type === 'loop')) {
    process.stdout.write(
      '\nloop nature (inside-outside contrast at +g and -g, black-white lobes of small loops): not run here, it renders each loop\n' +
        `a few thousand columns per condition; run  npx thinfoil nature ${set.finalPath('scenario.json')}\n`,
    );
  }
}

/**
 * The demo's last act: SYNTHETIC micrographs of a hidden candidate, then the
 * identification that a user would run on real ones.
 */
async function demoIdentification(demoDir: string, pool: RenderPool): Promise<void> {
  process.stdout.write(`\n--- identification from SYNTHETIC micrographs (made here from a hidden Burgers vector; not measured) ---\n`);
  const sc = parseScenario(DEMO_IDENTIFY_SCENARIO);
  const hidden = identificationCandidates(sc).find((c) => c.label === DEMO_HIDDEN_CANDIDATE);
  if (!hidden) throw new Error(`demo: hidden candidate ${DEMO_HIDDEN_CANDIDATE} is not among the candidates`);
  const syn = await syntheticMicrographs(sc, hidden, DEMO_MICROGRAPHS, DEMO_SYNTHESIS, (s) => renderScenario(s, pool));
  const args: string[] = [];
  const settings: Record<string, unknown> = {};
  // the synthetic micrographs are the identification's inputs: their own folder, beside its output
  const dir = join(demoDir, 'identify-micrographs');
  const inputs = OutputSet.begin(dir);
  for (const m of syn) {
    const file = inputs.write(syntheticFileName(m.conditionId, m.field), encodeFloatTiff(m.data, m.width, m.height, { pixel_nm: m.pixel_nm, description: 'SYNTHETIC micrograph made by thinfoil demo from a hidden candidate; not a measurement' }));
    args.push(`${m.conditionId}=${file}`);
    settings[m.conditionId] = { field: m.field, pixel_nm: m.pixel_nm, gAngle_deg: m.truth.gAngle_deg, blur_nm: DEMO_SYNTHESIS.blur_nm };
  }
  const scenarioFile = inputs.write('identify-scenario.json', `${jsonText({ ...DEMO_IDENTIFY_SCENARIO, micrographs: settings }, 2)}\n`);
  inputs.commit();
  process.stdout.write(`${syn.length} synthetic micrographs (signal-to-noise ${DEMO_SYNTHESIS.snr}, blur ${DEMO_SYNTHESIS.blur_nm} nm, 10 % background gradient, random shift and rotation) written to ${dir}\n`);
  process.stdout.write(
    'micrographs and identification use infinite-medium fields (no surface relaxation): "surfaces": "infinite" in the scenario keeps\n' +
      'this part short; relaxed surfaces, the default for your own scenarios, take several times the CPU time here\n' +
      '(the whole demo with this part relaxed: about 5x; README, Foil surfaces)\n\n',
  );
  const out = await runIdentify(scenarioFile, { micrograph: args, out: join(demoDir, 'identify'), pool });
  process.stdout.write(formatIdentify(out));
  const best = out.result.ranking[0]?.candidate;
  process.stdout.write(`\nhidden truth: ${hidden.label} -> ${best === hidden.label ? 'recovered as the best candidate' : `NOT recovered (best: ${best})`}\n`);
  process.stdout.write(`figure and report: ${out.files.figurePng}, ${out.files.figureSvg}, ${out.files.report}\n`);
}
