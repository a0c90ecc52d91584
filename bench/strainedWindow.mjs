// How much of each column a "strained window" could skip (issue 11, item 2): above and below the depth range
// where beta' matters, a column could use the closed-form perfect-crystal matrix instead of slices.
//
// Dropping beta' from a depth range changes the amplitudes by at most the integral of 2 pi |beta'| over it
// (first-order perturbation of d phi_g/dz = ... + 2 pi i beta' phi_g with |phi| <= 1; the intensity by at most
// twice that). So for an intensity tolerance tau a window may leave out a top range and a bottom range whose
// integrals of 2 pi |beta'| are each at most tau / 4. This script MEASURES those integrals on a fine depth
// grid for the columns of real scenarios (the demo, the example scenarios, single defects); a rigorous bound
// from the field can only leave out less than what is measured here, so the printed fractions are an upper
// limit on what item 2 could save. Run: node bench/strainedWindow.mjs (after npm run build). Never a test.
import { readFileSync, readdirSync } from 'node:fs';
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { buildField } from '../dist/imaging/fieldSpecs.js';
import { columnEntryPoint, pixelX } from '../dist/geometry/frames.js';
import { DEMO_SCENARIO } from '../dist/scenario/demo.js';
import { inclinedDislocation } from './common.mjs';

const TAUS = [1e-3, 1e-4, 1e-5, 1e-6];
const GRID = 24; // columns per image side sampled
const DZ = 0.02; // nm, depth step of the measurement

/** For one condition: per tau, the mean fraction of column length outside the window and the share of columns with nothing to integrate. */
function measure(sc, cond) {
  const job = renderJob(sc, resolveCondition(sc, cond));
  const field = buildField(job.model.fields);
  if (field === null) return null;
  const dir = field.directional(job.g_cart, job.frame.ez);
  const L = job.frame.columnLength_nm;
  const [kx, ky, kz] = job.frame.ez;
  const n = Math.ceil(L / DZ);
  const h = L / n;
  const w = new Float64Array(n); // 2 pi |beta'| h per sample (midpoint rule)
  const c0 = new Float64Array(3);
  const out = TAUS.map(() => ({ skipped: 0, empty: 0 }));
  let columns = 0;
  for (let j = 0; j < GRID; j++) {
    for (let i = 0; i < GRID; i++) {
      const x = pixelX(Math.floor(((i + 0.5) * job.width) / GRID), job.width, job.pixel_nm);
      const y = pixelX(Math.floor(((j + 0.5) * job.height) / GRID), job.height, job.pixel_nm);
      columnEntryPoint(c0, job.frame, x, y);
      let total = 0;
      for (let k = 0; k < n; k++) {
        const z = (k + 0.5) * h;
        const b = dir(c0[0] + z * kx, c0[1] + z * ky, c0[2] + z * kz);
        w[k] = Number.isFinite(b) ? 2 * Math.PI * Math.abs(b) * h : Infinity;
        total += w[k];
      }
      columns++;
      TAUS.forEach((tau, q) => {
        const budget = tau / 4;
        if (total <= 2 * budget) {
          out[q].empty++;
          out[q].skipped += 1;
          return;
        }
        let top = 0;
        let a = 0;
        while (a < n && top + w[a] <= budget) top += w[a++];
        let bottom = 0;
        let b = n;
        while (b > a && bottom + w[b - 1] <= budget) bottom += w[--b];
        out[q].skipped += (a + (n - b)) / n;
      });
    }
  }
  return out.map((o) => ({ skipped: o.skipped / columns, empty: o.empty / columns }));
}

const cases = [];
// the infinite medium throughout (what README, Speed, quotes); relaxed corrections only add slowly decaying fields
cases.push({ name: 'demo', sc: { ...DEMO_SCENARIO, surfaces: 'infinite' } });
for (const f of readdirSync(new URL('../scenarios/', import.meta.url)).filter((f) => f.endsWith('.json')).sort()) {
  cases.push({ name: `scenarios/${f}`, sc: { ...JSON.parse(readFileSync(new URL(`../scenarios/${f}`, import.meta.url), 'utf8')), surfaces: 'infinite' } });
}
cases.push({ name: 'bench: inclined dislocation 128 nm field', sc: inclinedDislocation({ size: 256, pixel_nm: 0.5 }) });
const single = (name, defect) => ({
  name,
  sc: { ...inclinedDislocation({ size: 256, pixel_nm: 0.5 }), defects: [defect] },
});
cases.push(single('single inclusion r 3 nm, misfit 0.01, mid-foil', { type: 'inclusion', centre_nm: [0, 0, 50], radius_nm: 3, misfit: 0.01 }));
cases.push(single('single loop r 5 nm, 1/3[111] on (111), mid-foil', { type: 'loop', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [0, 0, 50], radius_nm: 5 }));

console.log(`strained window: fraction of column length a window could skip (measured, an upper limit), ${GRID} x ${GRID} columns per condition, depth step ${DZ} nm`);
console.log(`columns: ${TAUS.map((t) => `tau ${t.toExponential(0)}`).join(' | ')}   (each: length skipped / columns with nothing left)`);
for (const c of cases) {
  let sc;
  try {
    sc = parseScenario(c.sc);
  } catch (e) {
    console.log(`${c.name}: not parsed (${e.message})`);
    continue;
  }
  for (const cond of sc.conditions) {
    const m = measure(sc, cond);
    if (m === null) continue;
    const row = m.map((r) => `${(100 * r.skipped).toFixed(1)} % / ${(100 * r.empty).toFixed(1)} %`).join(' | ');
    console.log(`${c.name} ${cond.id}: ${row}`);
  }
}
