// Benchmark: 256 x 256 weak-beam dark field g(3g) of one inclined dislocation with a 5-beam systematic row.
// Prints the wall time on all cores and the ratio against the two-beam engine on the same image,
// measured in the same run (the baseline). Run with `npm run bench`. Never a timed test.
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { createRenderPool } from '../dist/imaging/workerPool.js';

const base = {
  name: 'bench weak beam',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 100, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 256, height_px: 256, pixel_nm: 0.25 },
  surfaces: 'infinite',
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 50] }],
};
const job = (beams) => {
  const sc = parseScenario({ ...base, conditions: [{ id: 'wb', g: [2, 2, 0], weakBeam: 3, beams }] });
  return renderJob(sc, resolveCondition(sc, sc.conditions[0]));
};
const pool = createRenderPool();
async function time(j) {
  await pool.render(j); // warm-up
  const ts = [];
  let slices = 0;
  for (let r = 0; r < 3; r++) {
    const t0 = performance.now();
    slices = (await pool.render(j)).slices;
    ts.push((performance.now() - t0) / 1000);
  }
  return { seconds: ts.sort((a, b) => a - b)[1], slices };
}
const two = await time(job(2));
const five = await time(job({ row: [-1, 4] })); // 6 beams -g .. 4g: a weak-beam row must hold 3g and 4g
await pool.close();
const f = (x) => x.toPrecision(3);
console.log(`weak beam g(3g), 256 x 256, one inclined dislocation, Cu 220 at 200 kV, t = 100 nm, ${pool.threads} threads (median of 3)`);
console.log(`two-beam engine (baseline): ${f(two.seconds)} s, ${f(two.slices / 65536)} slices/column`);
console.log(`6-beam systematic row     : ${f(five.seconds)} s, ${f(five.slices / 65536)} steps/column`);
console.log(`ratio 6-beam / two-beam   : ${f(five.seconds / two.seconds)}x`);
