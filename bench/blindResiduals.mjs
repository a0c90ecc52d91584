#!/usr/bin/env node
/**
 * Measurement for the absolute goodness-of-fit check: runs identify in this
 * process on blind cases (test/fixtures/blind/) and writes, per case, the
 * micrographs' contrast, the registered windows of the leading candidates
 * (plane removed), their per-micrograph amplitudes and the absolute-fit
 * numbers identify reported, as JSON for offline study of residual statistics.
 *
 *   node bench/blindResiduals.mjs OUTDIR [--cases case00,case05] [--fixtures DIR]
 *
 * --fixtures: another set made by scripts/blind_micrographs.py --out DIR --seed N.
 */
import { mkdirSync, readFileSync, writeFileSync, rmSync, mkdtempSync } from 'node:fs';
import { join } from 'node:path';
import { tmpdir } from 'node:os';

const ROOT = join(import.meta.dirname, '..');
const { runIdentify } = await import(join(ROOT, 'dist', 'cli', 'identifyCommand.js'));
const { removePlane } = await import(join(ROOT, 'dist', 'analysis', 'preprocess.js'));
const fi = process.argv.indexOf('--fixtures');
const FIXTURES = fi < 0 ? join(ROOT, 'test', 'fixtures', 'blind') : process.argv[fi + 1];

const out = process.argv[2];
const ci = process.argv.indexOf('--cases');
const truth = JSON.parse(readFileSync(join(FIXTURES, 'truth.json'), 'utf8'));
const chosen = ci < 0 ? truth.cases : truth.cases.filter((c) => process.argv[ci + 1].split(',').includes(c.case));
mkdirSync(out, { recursive: true });
for (const c of chosen) {
  const dir = join(FIXTURES, c.case);
  const sc = JSON.parse(readFileSync(join(dir, 'scenario.json'), 'utf8'));
  const tmp = mkdtempSync(join(tmpdir(), 'absfit-'));
  const t0 = performance.now();
  const { result: r } = await runIdentify(join(dir, 'scenario.json'), { micrograph: sc.conditions.map((k) => `${k.id}=${join(dir, `${k.id}.png`)}`), out: join(tmp, 'o'), threads: 1 });
  rmSync(tmp, { recursive: true, force: true });
  const micrographs = r.micrographs.map((m, i) => ({
    id: m.conditionId,
    width: m.width,
    height: m.height,
    contrast: Array.from(m.contrast),
    leaders: r.leaderImages.map((imgs, k) => ({
      candidate: r.ranking[k].candidate,
      amplitude: r.ranking[k].perCondition[i].amplitude,
      r2: r.ranking[k].perCondition[i].r2,
      window: Array.from(removePlane(new Float64Array(imgs[i].length), imgs[i], m.width, m.height)),
    })),
  }));
  writeFileSync(
    join(out, `${c.case}.json`),
    JSON.stringify({ case: c.case, inList: c.inList, kind: c.kind, truth: c.b, decision: r.verdict.decision, best: r.verdict.best, scores: r.ranking.map((x) => [x.candidate, x.score]), absolute: r.absolute, micrographs, seconds: (performance.now() - t0) / 1000 }),
  );
  process.stdout.write(`${c.case} ${c.kind} ${r.verdict.decision} ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
}
