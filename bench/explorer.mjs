// Benchmark: time from a control change in the `thinfoil explore` page to the new 256 x 256
// bright- and dark-field image of one inclined dislocation (100 nm foil), in Debian's chromium,
// against the baseline measured in the same run: the same job rendered by the CLI's worker pool
// in Node.js with as many threads as the page has workers.
// Run: `npm run build && node bench/explorer.mjs` (needs /usr/bin/chromium). Never a timed test.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { createRenderPool } from '../dist/imaging/workerPool.js';
import { pageFiles } from '../dist/cli/exploreCommand.js';
import { startExplorerServer } from '../dist/explorer/server.js';
import { inclinedDislocation, median } from './common.mjs';

const RAW = inclinedDislocation();
const ROUNDS = 5;

const dir = mkdtempSync(join(tmpdir(), 'thinfoil-bench-explore-'));
const files = pageFiles();
files.set('/scenario.json', { type: 'application/json', body: Buffer.from(JSON.stringify(RAW)) });
const srv = await startExplorerServer(files);
const ctx = await chromium.launchPersistentContext(join(dir, 'profile'), {
  executablePath: '/usr/bin/chromium',
  headless: true,
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await ctx.newPage();
await page.goto(srv.url);
const workers = await page.evaluate(() => Math.max(1, Math.min(8, navigator.hardwareConcurrency || 2)));
await page.waitForFunction(() => window.explorer.renders > 0, null, { timeout: 120_000 });
const pageMs = [];
for (let k = 0; k < ROUNDS; k++) {
  const n = await page.evaluate(() => window.explorer.renders);
  await page.evaluate((w) => {
    const el = document.getElementById('deviation');
    el.value = String(w);
    el.dispatchEvent(new Event('input', { bubbles: true }));
  }, k % 2 === 0 ? 0.8 : 0.5);
  await page.waitForFunction((m) => window.explorer.renders > m, n, { timeout: 120_000 });
  pageMs.push(await page.evaluate(() => window.explorer.lastMs));
}
await ctx.close();
await srv.close();

const sc = parseScenario(RAW);
const job = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
const pool = createRenderPool(workers);
const nodeMs = [];
for (let k = 0; k < ROUNDS; k++) {
  const t0 = performance.now();
  await pool.render(job);
  nodeMs.push(performance.now() - t0);
}
await pool.close();

const p = median(pageMs);
const b = median(nodeMs);
console.log(`explore page, control change -> new 256 x 256 image (${workers} workers): median ${p.toFixed(0)} ms of ${pageMs.map((x) => x.toFixed(0)).join(', ')}`);
console.log(`baseline, CLI worker pool in Node.js (${workers} threads), same job: median ${b.toFixed(0)} ms of ${nodeMs.map((x) => x.toFixed(0)).join(', ')}`);
console.log(`ratio page / CLI pool: ${(p / b).toFixed(2)}`);
