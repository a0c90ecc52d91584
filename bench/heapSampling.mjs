// Allocation of the many-beam engine, measured with V8's heap sampling (inspector HeapProfiler,
// sampling interval 128 bytes) around renders on the calling thread, after a warm-up render:
// bytes allocated per integrator step and per column (set-up included), and the functions that
// allocate most. One boxed number per step would be 12-16 bytes/step. The sampler is asked to keep the
// samples of objects that a minor or major GC has already collected: by default it reports only what is
// still alive when sampling stops, which hides short-lived garbage (boxed numbers) entirely.
// Run: node bench/heapSampling.mjs (after npm run build). Prints figures; never a timed test.
import { Session } from 'node:inspector/promises';
import { parseScenario } from '../dist/scenario/parse.js';
import { renderJob } from '../dist/imaging/renderScenario.js';
import { resolveCondition } from '../dist/imaging/resolveCondition.js';
import { renderRows } from '../dist/imaging/renderRows.js';
import { renderTranslated, translationPlan } from '../dist/imaging/translationColumns.js';
import { DEMO_SCENARIO } from '../dist/scenario/demo.js';
const wb = {
  name: 'wb', material: 'Cu', kV: 200, foil: { thickness_nm: 100, normal: [0, 0, 1] }, beam: [0, 0, 1], imageX: [1, 0, 0],
  image: { width_px: 128, height_px: 128, pixel_nm: 0.5 },
  surfaces: 'infinite',
  conditions: [{ id: 'wb', g: [2, 2, 0], weakBeam: 3, beams: { row: [-2, 4] } }],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -1, 2], point_nm: [0, 0, 50] }],
};
const session = new Session();
session.connect();
async function measure(label, f) {
  // warm-up: three renders, so that the measured one runs the optimised code (after one, the engine's
  // functions were still being re-optimised and part of the run went through the interpreter, where every
  // double is boxed: 17 instead of 2.4 bytes/step on the 7-beam column-by-column path)
  for (let r = 0; r < 3; r++) f();
  await session.post('HeapProfiler.startSampling', { samplingInterval: 128, includeObjectsCollectedByMinorGC: true, includeObjectsCollectedByMajorGC: true });
  const st = f();
  const { profile } = await session.post('HeapProfiler.stopSampling');
  // every sample is an allocation (size scaled to the interval), whether or not it is still alive
  const bySample = new Map();
  let allBytes = 0;
  const idToNode = new Map();
  const index = (n) => { idToNode.set(n.id, n); for (const c of n.children) index(c); };
  index(profile.head);
  for (const s of profile.samples) {
    const n = idToNode.get(s.nodeId) ?? { callFrame: { functionName: "(unknown node)", url: "", lineNumber: 0 } };
    const k = `${n.callFrame.functionName || '(anon)'} ${n.callFrame.url.split('/').slice(-2).join('/')}:${n.callFrame.lineNumber}`;
    bySample.set(k, (bySample.get(k) ?? 0) + s.size);
    allBytes += s.size;
  }
  console.log(`${label}: ${st.columns} columns, ${st.slices} steps; sampled allocation ${(allBytes / 1024).toFixed(1)} KiB = ${(allBytes / st.slices).toFixed(3)} bytes/step, ${(allBytes / st.columns).toFixed(2)} bytes/column`);
  for (const [k, v] of [...bySample].sort((a, b) => b[1] - a[1]).slice(0, 6)) console.log(`   ${(v / 1024).toFixed(1)} KiB  ${k}`);
  // by module: the stepper and the fields (per step) apart from the per-render set-up (Bloch waves, field constants)
  const byFile = new Map();
  for (const [k, v] of bySample) {
    const file = k.split(' ')[1].split(':')[0] || '(builtin)';
    byFile.set(file, (byFile.get(file) ?? 0) + v);
  }
  const files = [...byFile].sort((a, b) => b[1] - a[1]).slice(0, 5);
  console.log(`   by module, bytes/step: ${files.map(([f, v]) => `${f} ${(v / st.slices).toFixed(3)}`).join(', ')}`);
}
const sc = parseScenario(wb);
const job = renderJob(sc, resolveCondition(sc, sc.conditions[0]));
const n = job.width * job.height;
const bf = new Float32Array(n), df = new Float32Array(n);
await measure('7-beam weak beam 128x128, column by column', () => renderRows({ ...job, shareColumns: false }, 0, job.height, bf, df));
const plan = translationPlan(job, { ignoreGain: true });
await measure('7-beam weak beam 128x128, shared columns', () => renderTranslated(job, plan, 0, 1, bf, df));
const dsc = parseScenario(DEMO_SCENARIO);
const djob = renderJob(dsc, resolveCondition(dsc, dsc.conditions[4]));
await measure('demo g220-wb3 (9 beams), rows 100-108, column by column', () => renderRows(djob, 100, 108, new Float32Array(8 * 256), new Float32Array(8 * 256)));
// a general beam set (not a systematic row): the stepper takes dR/dz, a 3-vector, from field.gradient
const gsc = parseScenario({ ...wb, image: { width_px: 64, height_px: 64, pixel_nm: 0.5 }, conditions: [{ id: 'set', g: [2, 2, 0], s_per_nm: 0.01, beams: { set: [[-2, -2, 0], [2, -2, 0], [-2, 2, 0]] } }] });
const gjob = renderJob(gsc, resolveCondition(gsc, gsc.conditions[0]));
await measure('4-beam general set 64x64, column by column', () => renderRows(gjob, 0, gjob.height, new Float32Array(64 * 64), new Float32Array(64 * 64)));
session.disconnect();
