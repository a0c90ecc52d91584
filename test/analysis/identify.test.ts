/**
 * Identification end to end on synthetic micrographs: recovery of a hidden
 * Burgers vector, "cannot tell" for a set built to be ambiguous, and bad
 * micrograph input. The synthetic micrographs are made by synthetic.ts from
 * the same simulation code, on a different pixel grid (rotated frame, shifted,
 * blurred, with a background gradient and Poisson noise); this tests the
 * registration, scoring and verdict, not the physics of the simulation.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { renderScenario, type ConditionImages } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';
import { syntheticMicrographs, isSyntheticName, syntheticFileName } from '../../src/analysis/synthetic.js';
import { prepareMicrographs, type MicrographInput } from '../../src/analysis/identifyMicrographs.js';
import { identify, type Renderer } from '../../src/analysis/identify.js';
import { DEFAULT_SETTINGS, parseMicrographSettings, usableTagPixel, type MicrographSettings } from '../../src/analysis/identifySettings.js';
import { seededRandom } from '../../src/analysis/identifyRandom.js';
import { InputError } from '../../src/errors.js';

/** One render pool for the file; candidate renders are the same in every case, so they are kept. */
const pool = createRenderPool(1);
const cache = new Map<string, readonly ConditionImages[]>();
const cachedRender: Renderer = async (s) => {
  const key = JSON.stringify([s.defects, s.conditions, s.image, s.imageX_cart]);
  const hit = cache.get(key);
  if (hit) return hit;
  const r = await renderScenario(s, pool);
  cache.set(key, r);
  return r;
};
const plainRender: Renderer = (s) => renderScenario(s, pool);

const CU = {
  name: 'test foil',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 70, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  // the constant ratio these cases were set up with (the default is now the thermal-diffuse model)
  absorption: 0.1,
  surfaces: 'infinite', // the identification's statistics, not the field: relaxed inclined lines render 3-14x slower (README, Foil surfaces)
  candidates: ['1/2<110>'],
};

function settingsFor(sc: Scenario, fields: readonly ('bf' | 'df')[], angles: readonly number[], blur_nm: number, maxShift_nm: number) {
  return new Map<string, MicrographSettings>(sc.conditions.map((c, i) => [c.id, { ...DEFAULT_SETTINGS, field: fields[i], pixel_nm: 1, gAngle_deg: angles[i], blur_nm, maxShift_nm }]));
}

describe('recovery of a hidden Burgers vector from synthetic micrographs', () => {
  // four conditions whose g.b patterns separate all twelve signed 1/2<110> vectors
  const sc = parseScenario({
    ...CU,
    // infinite medium: this checks the recovery machinery on 20 x 12 candidate renders; relaxed surfaces render an
    // inclined line column by column (about 5x slower, bench/surfaces.mjs), beyond this test's time limit
    surfaces: 'infinite',
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.5 },
      { id: 'g020', g: [0, 2, 0], w: 0.5 },
      { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
      { id: 'g1m11', g: [1, -1, 1], w: 0.5, beam: [0, 1, 1] },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [3, 1, 1], point_nm: [0, 0, 35] }],
  });
  const fields = ['bf', 'bf', 'df', 'bf'] as const;
  const angles = [10, 100, 40, -60];

  it('20 random cases (random signed b, shift up to 6 nm, rotation up to 3 degrees, SNR 5): top-1 accuracy >= 90 %', async () => {
    const cands = identificationCandidates(sc);
    const rnd = seededRandom(2024);
    const cases = 20;
    let top1 = 0;
    let identified = 0;
    let identifiedWrong = 0;
    const t0 = performance.now();
    for (let c = 0; c < cases; c++) {
      const truth = cands[Math.floor(rnd.uniform() * cands.length)];
      const syn = await syntheticMicrographs(
        sc,
        truth,
        sc.conditions.map((cd, i) => ({ conditionId: cd.id, field: fields[i], gAngle_deg: angles[i] })),
        { width: 64, height: 64, pixel_nm: 1, snr: 5, noise: 'poisson', blur_nm: 0.7, gradient: 0.1, maxShift_nm: 6, maxRotation_deg: 3, oversample: 1, seed: 1000 + c },
        plainRender,
      );
      const inputs: MicrographInput[] = syn.map((m) => ({ conditionId: m.conditionId, image: m, source: syntheticFileName(m.conditionId, m.field), synthetic: true }));
      const preps = prepareMicrographs(sc, inputs, settingsFor(sc, fields, angles, 0.7, 12));
      // the stated thickness, depth, line and w are exact here: nothing to fit (the fit is tested in identifyFit.test.ts)
      const res = await identify(sc, preps, cachedRender, { bootstrap: 20, seed: c + 1, fit: false });
      const ok = res.ranking[0].candidate === truth.label;
      if (ok) top1++;
      if (res.verdict.decision === 'identified') {
        identified++;
        if (!ok) identifiedWrong++;
      }
    }
    const seconds = (performance.now() - t0) / 1000;
    console.log(
      `identification on synthetic micrographs (SNR 5, 64 x 64 px at 1 nm, 4 conditions, 12 candidates): top-1 ${top1}/${cases} = ${((100 * top1) / cases).toFixed(0)} %, ` +
        `verdict "identified" in ${identified}/${cases} (wrong: ${identifiedWrong}), ${seconds.toFixed(1)} s`,
    );
    // requirement of the task: top-1 accuracy >= 90 %
    expect(top1 / cases).toBeGreaterThanOrEqual(0.9);
    // the verdict rule exists to avoid confident wrong answers
    expect(identifiedWrong).toBe(0);
  });
});

describe('a set built to be ambiguous gets "cannot tell"', () => {
  it('b = 1/2[1 1 0] and 1/2[1 0 -1] differ by 1/2[0 1 1], along the line, and every g is along [100]: identical images', async () => {
    // g.R of the difference: a screw component along u with g.(b - b') = 0 for every g used
    // (physics.md section 5: R3 = (b.u / 2 pi) theta), so both candidates give the same image. That holds in
    // isotropic elasticity; anisotropy couples the screw component into other directions (differences ~3e-6).
    // And in the infinite medium: the surface correction of the inclined line has components across b, so
    // relaxed surfaces tell the two apart.
    const sc = parseScenario({
      ...CU,
      elasticity: 'isotropic',
      surfaces: 'infinite',
      conditions: [
        { id: 'g200', g: [2, 0, 0], w: 0.5 },
        { id: 'gm200', g: [-2, 0, 0], w: 0.5 },
        { id: 'g200w', g: [2, 0, 0], w: 1.2 },
      ],
      defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [0, 1, 1], point_nm: [0, 0, 35] }],
      candidates: [{ b: '1/2[1 1 0]' }, { b: '1/2[1 0 -1]' }, { b: '1/2[0 1 1]' }],
    });
    const cands = identificationCandidates(sc);
    const truth = cands.find((c) => c.label === 'b = 1/2[1 1 0]')!;
    const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((c) => ({ conditionId: c.id, field: 'bf' as const })), {
      width: 56, height: 56, pixel_nm: 1, snr: 5, blur_nm: 0.7, maxShift_nm: 4, maxRotation_deg: 2, oversample: 1, seed: 77,
    }, plainRender);
    const preps = prepareMicrographs(
      sc,
      syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic' })),
      new Map(sc.conditions.map((c) => [c.id, { ...DEFAULT_SETTINGS, pixel_nm: 1, blur_nm: 0.7 }])),
    );
    const res = await identify(sc, preps, plainRender, { bootstrap: 20, fit: false });
    expect(res.verdict.decision).toBe('cannot tell');
    expect(new Set(res.ranking.slice(0, 2).map((r) => r.candidate))).toEqual(new Set(['b = 1/2[1 1 0]', 'b = 1/2[1 0 -1]']));
    expect(res.verdict.indistinguishable).toEqual(expect.arrayContaining(['b = 1/2[1 1 0]', 'b = 1/2[1 0 -1]']));
    expect(Math.abs(res.ranking[0].score - res.ranking[1].score)).toBeLessThan(1e-6);
    // the rest is excluded: the other candidates' images differ
    expect(res.verdict.indistinguishable.length).toBe(2);
    expect(res.ranking[0].score).toBeGreaterThan(0.1);
  });
});

describe('mirrored micrographs', () => {
  it('a micrograph that is the mirror image of the view along the beam is identified when "mirrored" is set, and fits worse when it is not', async () => {
    const sc = parseScenario({
      ...CU,
      conditions: [
        { id: 'g200', g: [2, 0, 0], w: 0.5 },
        { id: 'g020', g: [0, 2, 0], w: 0.5 },
        { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
      ],
      defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [3, 1, 1], point_nm: [0, 0, 35] }],
      candidates: [{ b: '1/2[1 1 0]' }, { b: '1/2[1 0 1]' }],
    });
    const truth = identificationCandidates(sc).find((c) => c.label === 'b = 1/2[1 0 1]')!;
    const angles = [30, 120, -45];
    const syn = await syntheticMicrographs(sc, truth, sc.conditions.map((c, i) => ({ conditionId: c.id, field: 'bf' as const, gAngle_deg: angles[i], mirrored: true })), {
      width: 56, height: 56, pixel_nm: 1, snr: 6, blur_nm: 0.6, maxShift_nm: 3, maxRotation_deg: 1.5, oversample: 1, seed: 12,
    }, cachedRender);
    const run = async (mirrored: boolean) => {
      const settings = new Map(sc.conditions.map((c, i) => [c.id, { ...DEFAULT_SETTINGS, pixel_nm: 1, gAngle_deg: angles[i], blur_nm: 0.6, maxShift_nm: 8, mirrored }]));
      const preps = prepareMicrographs(sc, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic' })), settings);
      return identify(sc, preps, cachedRender, { bootstrap: 10, fit: false });
    };
    const right = await run(true);
    const wrong = await run(false);
    console.log(`mirrored micrographs, scores with "mirrored": ${right.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}; without: ${wrong.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}`);
    expect(right.ranking[0].candidate).toBe(truth.label);
    const truthScore = (r: typeof right) => r.ranking.find((x) => x.candidate === truth.label)!.score;
    expect(truthScore(right)).toBeGreaterThan(truthScore(wrong) + 0.05);
    // the rotation found stays within the synthetic rotation range (1.5 degrees) plus the search precision
    for (const p of right.ranking[0].perCondition) expect(Math.abs(p.rotation_deg)).toBeLessThan(2.5);
  });
});

describe('bad micrograph input: one clear InputError', () => {
  const sc = parseScenario({ ...CU, conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }], defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [3, 1, 1] }] });
  const img = { width: 40, height: 30, data: Float32Array.from({ length: 1200 }, (_, i) => 100 + (i % 7)) };
  const one = (over: Partial<MicrographInput> = {}): MicrographInput[] => [{ conditionId: 'g200', image: img, source: 'm.tif', filePixel_nm: 0.5, ...over }];
  const withSettings = (raw: unknown) => parseMicrographSettings(raw, ['g200']);

  it('a micrograph for a condition that does not exist', () => {
    expect(() => prepareMicrographs(sc, one({ conditionId: 'g111' }), new Map())).toThrow(/"g111" is not a condition of the scenario; use one of g200/);
  });
  it('settings for a condition that does not exist', () => {
    expect(() => withSettings({ g111: { field: 'bf' } })).toThrow(/micrographs\.g111: names no condition/);
  });
  it('a crop outside the image', () => {
    expect(() => prepareMicrographs(sc, one(), withSettings({ g200: { crop: [10, 5, 40, 20] } }))).toThrow(/micrographs\.g200\.crop \[10, 5, 40, 20\] reaches outside the 40 x 30 pixel image m\.tif/);
  });
  it('a pixel size of zero', () => {
    expect(() => withSettings({ g200: { pixel_nm: 0 } })).toThrow(/micrographs\.g200\.pixel_nm: must be greater than 0/);
  });
  it('no pixel size, and only a 72 dpi placeholder in the file', () => {
    expect(usableTagPixel(25.4e6 / 72)).toBeUndefined();
    expect(usableTagPixel(25.4e6 / 96)).toBeUndefined();
    expect(usableTagPixel(0.37)).toBe(0.37);
    expect(() => prepareMicrographs(sc, one({ filePixel_nm: 25.4e6 / 72 }), new Map())).toThrow(/micrographs\.g200\.pixel_nm is missing and m\.tif carries no usable pixel size/);
  });
  it('the same condition twice, a crop too small, an offset that removes the background, a uniform image, a bad field', () => {
    expect(() => prepareMicrographs(sc, [...one(), ...one()], new Map())).toThrow(/given twice/);
    expect(() => prepareMicrographs(sc, one(), withSettings({ g200: { crop: [0, 0, 10, 10] } }))).toThrow(/at least 16 x 16/);
    expect(() => prepareMicrographs(sc, one(), withSettings({ g200: { offset: 200 } }))).toThrow(/offset \(200\) leaves a background at or below zero/);
    const flat = { width: 20, height: 20, data: new Float32Array(400).fill(3) };
    expect(() => prepareMicrographs(sc, one({ image: flat }), new Map())).toThrow(/uniform inside the crop/);
    expect(() => withSettings({ g200: { field: 'weak' } })).toThrow(/must be "bf" \(bright field\) or "df"/);
  });
  it('every such error is an InputError with a single sentence', () => {
    try {
      prepareMicrographs(sc, one({ conditionId: 'nope' }), new Map());
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(InputError);
      expect((e as Error).message.split('\n').length).toBe(1);
    }
  });
  it('synthetic micrographs are recognised by their file names', () => {
    expect(syntheticFileName('g200', 'bf')).toBe('synthetic-g200-bf.tif');
    expect(isSyntheticName('/data/run1/synthetic-g200-bf.tif')).toBe(true);
    expect(isSyntheticName('/data/synthetic-run/g200.tif')).toBe(false);
  });
});
