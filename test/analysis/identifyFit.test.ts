/**
 * Fitted nuisance parameters, absolute goodness of fit and consistency flags
 * of identification, on synthetic micrographs. The micrographs are made by
 * synthetic.ts with thinfoil's own renderer on a different pixel grid (shift,
 * rotation, blur, background gradient, Poisson noise) from a scenario whose
 * thickness, depth and w differ from the stated ones: this checks the
 * fitting, the verdict and the checks (plumbing and statistics), not the
 * physics of the simulation.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import type { Scenario } from '../../src/scenario/types.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { identificationCandidates, type Candidate } from '../../src/analysis/candidates.js';
import { syntheticMicrographs } from '../../src/analysis/synthetic.js';
import { prepareMicrographs } from '../../src/analysis/identifyMicrographs.js';
import { identify, type Renderer } from '../../src/analysis/identify.js';
import { DEFAULT_SETTINGS, type MicrographSettings } from '../../src/analysis/identifySettings.js';
import { DEFAULT_FIT } from '../../src/analysis/fitSettings.js';
import { DEMO_HIDDEN_CANDIDATE, DEMO_IDENTIFY_SCENARIO, DEMO_MICROGRAPHS, DEMO_SYNTHESIS } from '../../src/scenario/demoIdentify.js';

const pool = createRenderPool(1);
const render: Renderer = (s) => renderScenario(s, pool);

const FIELDS = ['bf', 'bf', 'df', 'bf'] as const;
const ANGLES = [15, 105, -40, 140];
const raw = (t: number, depth: number, w: number, b: string, candidates: readonly { b: string }[], g11m1: number[] = [1, 1, -1]) => ({
  name: 'fit test',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: t, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  absorption: 0.1,
  surfaces: 'infinite', // the identification's statistics, not the field: relaxed inclined lines render 3-14x slower (README, Foil surfaces)
  conditions: [
    { id: 'g200', g: [2, 0, 0], w },
    { id: 'g020', g: [0, 2, 0], w },
    { id: 'g11m1', g: g11m1, w, beam: [0, 1, 1] },
    { id: 'g1m11', g: [1, -1, 1], w, beam: [0, 1, 1] },
  ],
  defects: [{ type: 'dislocation', b, line: [3, 1, 1], point_nm: [0, 0, depth] }],
  candidates,
});

async function micrographsOf(truthSc: Scenario, truth: Candidate, stated: Scenario, size: number, seed: number) {
  const syn = await syntheticMicrographs(
    truthSc,
    truth,
    truthSc.conditions.map((c, i) => ({ conditionId: c.id, field: FIELDS[i], gAngle_deg: ANGLES[i] })),
    { width: size, height: size, pixel_nm: 1, snr: 6, blur_nm: 0.7, maxShift_nm: 3, maxRotation_deg: 1.5, oversample: 1, seed },
    render,
  );
  const settings = new Map<string, MicrographSettings>(stated.conditions.map((c, i) => [c.id, { ...DEFAULT_SETTINGS, field: FIELDS[i], pixel_nm: 1, gAngle_deg: ANGLES[i], blur_nm: 0.7, maxShift_nm: 10 }]));
  return prepareMicrographs(stated, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic' })), settings);
}

const TWO_B = [{ b: '1/2[0 1 -1]' }, { b: '1/2[1 -1 0]' }];

describe('fitted nuisance parameters', () => {
  it('thickness +15 %, depth 15 nm deeper and w 0.7 instead of the stated 0.5: the fit recovers them, the true candidate is best and not wrongly excluded', async () => {
    const stated = parseScenario(raw(70, 35, 0.5, '1/2[0 1 -1]', TWO_B));
    const truthSc = parseScenario(raw(80.5, 50, 0.7, '1/2[0 1 -1]', TWO_B));
    const truth = identificationCandidates(truthSc).find((c) => c.label === 'b = 1/2[0 -1 1]')!;
    const preps = await micrographsOf(truthSc, truth, stated, 56, 5);
    // the user states a thickness range of +-20 % (the truth, +15 %, would sit exactly on the edge of the default +-15 %)
    const res = await identify(stated, preps, render, { bootstrap: 16, fit: { ...DEFAULT_FIT, thicknessRange: 0.2 } });
    const best = res.ranking[0];
    const p = (name: string) => best.fit!.parameters.find((x) => x.name === name)!;
    console.log(`fit: ${res.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}; ${best.fit!.parameters.map((x) => `${x.name} ${x.value.toFixed(2)}`).join(', ')}; ${res.verdict.decision}; ${res.seconds.fit.toFixed(1)} s fitting`);
    expect(best.candidate).toBe(truth.label);
    // every fitted value inside its stated range (+-20 % thickness, default +-0.3 w, +-t/4 depth, 5 degree cone)
    for (const r of res.ranking) for (const x of r.fit?.parameters ?? []) expect(x.value >= x.lo - 1e-9 && x.value <= x.hi + 1e-9).toBe(true);
    // tolerances: thickness within 6 nm (about a sixth of the effective extinction distance here), depth within 6 nm,
    // w within 0.15 on at least three of the four micrographs and within 0.25 on all (at SNR 6 on 56 x 56 pixels a
    // micrograph's score can change little with w: it is determined only as far as the image depends on it)
    expect(Math.abs(p('thickness').value - 80.5)).toBeLessThan(6);
    expect(Math.abs(p('depth').value - 50)).toBeLessThan(6);
    const wErr = ['g200', 'g020', 'g11m1', 'g1m11'].map((id) => Math.abs(p(`w ${id}`).value - 0.7));
    expect(wErr.filter((e) => e < 0.15).length).toBeGreaterThanOrEqual(3);
    for (const e of wErr) expect(e).toBeLessThan(0.25);
    expect(best.fit!.fittedScore).toBeGreaterThan(best.fit!.nominalScore);
    // nothing excluded wrongly: the truth is the best, so it is never among the excluded; and the micrographs are explained
    expect(res.verdict.decision).not.toBe('no candidate explains');
    expect(res.absolute.explained).toBe(true);
    // one source for the needed gap: each comparison is excluded exactly when its gap exceeds its own needed gap
    for (const c of res.verdict.comparisons) expect(c.excluded).toBe(c.gap > c.threshold);
  }, 180_000);
});

describe('absolute goodness of fit and consistency', () => {
  it('a defect outside the candidate list (b = [0 0 1], not of the 1/2<110> family given): "no candidate explains", with advice', async () => {
    const cands = [{ b: '1/2[1 1 0]' }, { b: '1/2[1 0 1]' }];
    const stated = parseScenario(raw(70, 35, 0.5, '1/2[1 1 0]', cands));
    const truthSc = parseScenario({ ...raw(70, 35, 0.5, '[0 0 1]', [{ b: '[0 0 1]' }]) });
    const truth = identificationCandidates(truthSc)[0];
    const preps = await micrographsOf(truthSc, truth, stated, 48, 9);
    const res = await identify(stated, preps, render, { bootstrap: 10, top: 2, fit: DEFAULT_FIT });
    console.log(`wrong family: ${res.absolute.perMicrograph.map((p) => `${p.condition} structure ${p.structure.toFixed(2)}`).join(', ')}; ${res.verdict.decision}`);
    expect(res.verdict.decision).toBe('no candidate explains');
    expect(res.verdict.statement).toMatch(/No candidate explains the micrographs/);
    expect(res.verdict.statement).toMatch(/Widen the candidate list/);
  }, 180_000);

  it('g reversed on one micrograph (the micrograph shows -g where the scenario says g) is flagged by name and blocks "identified"', async () => {
    // reversed on g11m1 (beam [0 1 1], foil normal [0 0 1]: the tilted foil makes the depth profile asymmetric).
    // With the beam along the foil normal a reversed g leaves this line's image nearly its own 180-degree
    // rotation (R2 as stated and reversed agree to 1e-4 for g200 and g020 here): no check can see it there.
    const stated = parseScenario(raw(70, 35, 0.5, '1/2[0 1 -1]', TWO_B));
    const truthSc = parseScenario(raw(70, 35, 0.5, '1/2[0 1 -1]', TWO_B, [-1, -1, 1]));
    const truth = identificationCandidates(truthSc).find((c) => c.label === 'b = 1/2[0 -1 1]')!;
    const preps = await micrographsOf(truthSc, truth, stated, 48, 21);
    const res = await identify(stated, preps, render, { bootstrap: 10, fit: false });
    console.log(`g reversed: ${JSON.stringify(res.consistency)} ${res.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}; ${res.verdict.decision}`);
    const f = res.flags.filter((x) => x.kind === 'g reversed');
    expect(f.map((x) => x.condition)).toEqual(['g11m1']);
    expect(res.verdict.decision).not.toBe('identified');
    expect(res.verdict.statement).toMatch(/g11m1 fits far better with g reversed/);
  }, 120_000);

  it('the registration-limit flag stays silent on the demo identification (correct inputs)', async () => {
    const sc = parseScenario(DEMO_IDENTIFY_SCENARIO);
    const hidden = identificationCandidates(sc).find((c) => c.label === DEMO_HIDDEN_CANDIDATE)!;
    const syn = await syntheticMicrographs(sc, hidden, DEMO_MICROGRAPHS, DEMO_SYNTHESIS, render);
    const settings = new Map(syn.map((m) => [m.conditionId, { ...DEFAULT_SETTINGS, field: m.field, pixel_nm: m.pixel_nm, gAngle_deg: m.truth.gAngle_deg, blur_nm: DEMO_SYNTHESIS.blur_nm }]));
    const preps = prepareMicrographs(sc, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic', synthetic: true })), settings);
    const res = await identify(sc, preps, render, { bootstrap: 10, fit: false });
    expect(res.ranking[0].candidate).toBe(DEMO_HIDDEN_CANDIDATE);
    expect(res.flags).toEqual([]);
    expect(res.verdict.statement).not.toMatch(/edge of its search range|limit of its/);
    expect(res.absolute.explained).toBe(true);
  }, 120_000);
});

describe('micrographs of one field of view share one registration', () => {
  const rawView = {
    name: 'view test',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 60, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    absorption: 0.1,
    surfaces: 'infinite',
    elasticity: 'isotropic',
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.3 },
      { id: 'gm200', g: [-2, 0, 0], w: 0.3 },
      { id: 'g11m1', g: [1, 1, -1], w: 0.5, beam: [0, 1, 1] },
    ],
    defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 2, 4], point_nm: [0, 0, 30] }],
    candidates: [{ b: '1/2[1 0 1]' }],
  };
  it('g and -g of the same area: one shift for both, and the gap between b and -b is at least as large as with separate registrations', async () => {
    const sc = parseScenario(rawView);
    const truth = identificationCandidates(sc).find((c) => c.label === 'b = 1/2[1 0 1]')!;
    // one synthetic field of view: the same random shift and rotation for g200 and gm200 (the same seed, one condition each)
    const angles: Record<string, number> = { g200: 10, gm200: 190, g11m1: -30 };
    const one = async (id: string, seed: number) =>
      (await syntheticMicrographs(sc, truth, [{ conditionId: id, field: 'bf', gAngle_deg: angles[id] }], { width: 48, height: 48, pixel_nm: 1, snr: 6, blur_nm: 0.6, maxShift_nm: 3, maxRotation_deg: 1, oversample: 1, seed }, render))[0];
    const syn = [await one('g200', 31), await one('gm200', 31), await one('g11m1', 32)];
    expect(syn[0].truth.shift_nm).toEqual(syn[1].truth.shift_nm);
    const run = async (shared: boolean) => {
      const settings = new Map<string, MicrographSettings>(
        sc.conditions.map((c) => [c.id, { ...DEFAULT_SETTINGS, pixel_nm: 1, gAngle_deg: angles[c.id], blur_nm: 0.6, maxShift_nm: 8, ...(shared && c.id !== 'g11m1' ? { view: 'A' } : {}) }]),
      );
      const preps = prepareMicrographs(sc, syn.map((m) => ({ conditionId: m.conditionId, image: m, source: 'synthetic' })), settings);
      return identify(sc, preps, render, { bootstrap: 10, fit: false });
    };
    const sep = await run(false);
    const shared = await run(true);
    const gapOf = (r: typeof sep) => r.ranking[0].score - r.ranking[1].score;
    console.log(`shared view: ${shared.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}; separate: ${sep.ranking.map((r) => `${r.candidate} ${r.score.toFixed(3)}`).join(', ')}`);
    const best = shared.ranking[0];
    expect(best.candidate).toBe(truth.label);
    expect(best.perCondition[0].shift_nm).toEqual(best.perCondition[1].shift_nm);
    expect(best.perCondition[0].rotation_deg).toBe(best.perCondition[1].rotation_deg);
    expect(gapOf(shared)).toBeGreaterThanOrEqual(gapOf(sep) - 0.01);
  }, 120_000);

  it('a view shared across beam directions is refused with the field named', async () => {
    const sc = parseScenario(rawView);
    const img = { width: 40, height: 40, data: Float32Array.from({ length: 1600 }, (_, i) => 100 + (i % 7)) };
    const settings = new Map<string, MicrographSettings>(sc.conditions.map((c) => [c.id, { ...DEFAULT_SETTINGS, pixel_nm: 1, gAngle_deg: 0, view: 'A' }]));
    const preps = prepareMicrographs(sc, sc.conditions.map((c) => ({ conditionId: c.id, image: img, source: `${c.id}.tif` })), settings);
    await expect(identify(sc, preps, render, { bootstrap: 0, fit: false })).rejects.toThrow(/micrographs\.g11m1\.view "A" is shared with g200, taken in another beam direction/);
  });
});

describe('measured values in the identification scenario', () => {
  it('a measured w (micrographs.<id>.w) and thickness (fit.thickness_nm) replace the stated ones even when nothing is fitted', async () => {
    const sc = parseScenario({ ...raw(70, 35, 0.5, '1/2[0 1 -1]', [{ b: '1/2[0 1 -1]' }]), conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }] });
    const img = { width: 24, height: 24, data: Float32Array.from({ length: 576 }, (_, i) => 100 + ((i * 7) % 5)) };
    const settings = new Map<string, MicrographSettings>([['g200', { ...DEFAULT_SETTINGS, pixel_nm: 1, gAngle_deg: 0, w: 0.62, wError: 0.05, maxShift_nm: 2 }]]);
    const preps = prepareMicrographs(sc, [{ conditionId: 'g200', image: img, source: 'g200.tif' }], settings);
    const res = await identify(sc, preps, render, { bootstrap: 0, fit: { ...DEFAULT_FIT, enabled: false, thickness_nm: 84, thicknessError_nm: 3 } });
    expect(res.micrographs[0].resolved.w).toBeCloseTo(0.62, 9);
    expect(res.micrographs[0].resolved.frame.thickness_nm).toBe(84);
    expect(res.ranking.every((r) => r.fit === undefined)).toBe(true);
  }, 60_000);
});
