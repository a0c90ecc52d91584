// Benchmark: the optical-potential coefficients of a many-beam set (every pair g - h of N beams,
// U_{g-h} and U'_{g-h}) with the thermal-diffuse absorption model, against the constant ratio
// (baseline, the same loop in the same run), and the cost per pair. Run with `npm run bench`.
// Never a timed test.
import { getMaterial } from '../dist/crystal/materials.js';
import { opticalPotential_per_nm2 } from '../dist/scattering/reflection.js';

const beams = [];
for (let h = -4; h <= 4; h += 2) for (let k = -4; k <= 4; k += 2) beams.push([h, k, 0]); // 25 beams of a [001] zone in fcc
function allPairs(m, absorption) {
  let acc = 0;
  for (const a of beams) for (const b of beams) acc += opticalPotential_per_nm2(m, [a[0] - b[0], a[1] - b[1], a[2] - b[2]], 200, absorption).absRe;
  return acc;
}
function time(m, absorption) {
  allPairs(m, absorption); // warm-up (packs the sites, builds the kernels)
  const ts = [];
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    for (let i = 0; i < 20; i++) allPairs(m, absorption);
    ts.push((performance.now() - t0) / 20 / 1000);
  }
  return ts.sort((a, b) => a - b)[2];
}
const f = (x) => x.toPrecision(3);
console.log(`many-beam coefficients: ${beams.length} beams, ${beams.length ** 2} pairs, 200 kV (median of 5 x 20)`);
for (const name of ['Cu', 'GaAs', 'Ni3Al']) {
  const m = getMaterial(name);
  const ratio = time(m, 0.1);
  const model = time(m, 'thermal-diffuse');
  console.log(`${name.padEnd(6)} ratio 0.1 (baseline): ${f(ratio * 1e3)} ms, thermal-diffuse: ${f(model * 1e3)} ms (${f((model / beams.length ** 2) * 1e6)} us per pair), ratio ${f(model / ratio)}x`);
}
