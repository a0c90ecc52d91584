/**
 * The plan: for the 1/2<110> family in fcc copper near [001] with a +-30 degree
 * double-tilt holder, the chosen conditions tell every candidate (sign
 * included) apart in simulation, and the covers behave as set-cover theory says.
 *
 * What is outside the code under test: the invisibility rule g.b = 0 with
 * small g.(b x u) (Hirsch et al. 1965; physics.md section 6), the geometry of
 * the reachable zones (angles between cubic directions, by hand), and the
 * classic example where the greedy set cover is not optimal (Johnson 1974,
 * textbook form). The identification check itself is "in simulation": it
 * re-simulates the chosen conditions on a finer strip, which checks the
 * plumbing and the robustness of the choice, not the physics.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../src/scenario/parse.js';
import { plan, PLAN_DEFAULTS } from '../../src/planning/plan.js';
import { orientation } from '../../src/planning/holder.js';
import { candidateStrips } from '../../src/planning/separation.js';
import { exactCover, greedyCover, leastTiltOrder } from '../../src/planning/chooseSet.js';
import { gDotBCrossU } from '../../src/analysis/visibility.js';
import { identificationCandidates } from '../../src/analysis/candidates.js';

const sc = parseScenario({
  name: 'planning test (invented)',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 100, normal: [0, 0, 1] },
  beam: [0, 0, 1],
  imageX: [1, 0, 0],
  image: { width_px: 64, height_px: 64, pixel_nm: 1 },
  absorption: 0.1,
  // the rule checked below is infinite-medium physics; with relaxed surfaces this line (parallel to the surfaces,
  // with an edge part) bends the plate, and the far halves' turn (-+ kink/2) changes the strip's background on
  // each side by up to 0.15 for g.b = 0 candidates (README, Foil surfaces)
  surfaces: 'infinite',
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 1 }],
  defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, -2, 0], point_nm: [0, 0, 50] }],
  candidates: ['1/2<110>'],
});
const holder = { kind: 'double' as const, primary_deg: [-30, 30] as const, secondary_deg: [-30, 30] as const };
const result = plan(sc, { ...PLAN_DEFAULTS, holder, orientation: orientation([0, 0, 1], [1, 0, 0]), current: { primary_deg: 0, secondary_deg: 0 }, defectIndex: 0 });

describe('plan: 1/2<110> in fcc Cu near [001], +-30 degree double tilt', () => {
  it('finds the zones a +-30 degree holder reaches from (001): [001], <013>, <012>, <112> but not <111> or <011> (angles by hand)', () => {
    // angle to [001]: [013] 18.4, [012] 26.6, [112] 35.3 (alpha 24.1, beta 26.6: both within 30), [011] 45 (alpha 45), [111] 54.7
    const zones = result.zones.map((z) => z.zone.join(','));
    for (const z of ['0,0,1', '0,1,3', '1,0,2', '1,1,2', '-1,1,2']) expect(zones).toContain(z);
    for (const z of ['1,1,1', '0,1,1', '1,0,1']) expect(zones).not.toContain(z);
  });

  it('lists 111, 200 and 220 reflections with |g| <= 8 nm^-1 and no forbidden ones (fcc: h, k, l all even or all odd)', () => {
    for (const c of result.conditions) {
      const par = c.g.map((x) => Math.abs(x) % 2);
      expect(par.every((p) => p === par[0])).toBe(true);
    }
    const ids = result.conditions.map((c) => c.id);
    for (const id of ['g200', 'g020', 'g220', 'g2m20', 'g111']) expect(ids).toContain(id);
  });

  it('the simulated strips obey the invisibility rule: g.b = 0 and |g.(b x u)| < 0.64 gives weak contrast (Hirsch et al. 1965)', () => {
    let checked = 0;
    for (const c of result.conditions.slice(0, 4)) {
      const peaks: number[] = [];
      const weak: number[] = [];
      const strip = candidateStrips(sc, result.candidates, c.condition);
      result.candidates.forEach((cand, i) => {
        const gb = c.gb[i];
        const m = Math.abs(gDotBCrossU(sc.material.lattice, c.g, cand.b!, cand.line!));
        let peak = 0;
        strip.x_nm.forEach((x, k) => { if (Math.abs(x) >= 2) peak = Math.max(peak, Math.abs(strip.contrast[i][k])); });
        if (gb === 0 && m < 0.64) weak.push(peak);
        if (Math.abs(gb) >= 1) peaks.push(peak);
      });
      // weak residual: well below the contrast of every g.b != 0 candidate under the same g (less than half of it)
      for (const w of weak) {
        expect(w).toBeLessThan(0.5 * Math.min(...peaks));
        expect(w).toBeLessThan(0.15);
        checked++;
      }
      for (const p of peaks) expect(p).toBeGreaterThan(0.1);
    }
    expect(checked).toBeGreaterThan(0);
  });

  it('the chosen set identifies b and its sign: re-simulated on a finer strip, each candidate as the truth leaves exactly one consistent candidate', () => {
    expect(result.complete).toBe(true);
    const n = result.candidates.length;
    expect(n).toBe(12);
    const strips = result.steps.map((s) => candidateStrips(sc, result.candidates, s.condition.condition, { ...PLAN_DEFAULTS.strip, columns: 161 }));
    for (let truth = 0; truth < n; truth++) {
      const consistent: number[] = [];
      for (let j = 0; j < n; j++) if (strips.every((st) => st.difference[truth * n + j] < PLAN_DEFAULTS.strip.minDifference)) consistent.push(j);
      expect(consistent).toEqual([truth]);
    }
  });

  it('greedy is not worse than exhaustive search here, and the order starts with the least tilt', () => {
    expect(result.exactSize).toBeDefined();
    expect(result.steps.length).toBe(result.exactSize);
    // the first step is the nearer of the chosen conditions
    const tilts = result.steps.map((s) => s.condition.fromCurrent_deg);
    expect(result.steps[0].condition.fromCurrent_deg).toBe(Math.min(...tilts));
  });
});

describe('set covers and tilt order (small cases)', () => {
  const bits = (n: number, on: number[]) => { const a = new Uint8Array(n); for (const i of on) a[i] = 1; return a; };

  it('greedy against exhaustive search on 200 small random cases (seeded): complete together, mostly equal, at most one more', () => {
    // Greedy set cover is not optimal in general (next test), so "not worse" holds case by case, not as a theorem:
    // the plan runs the exhaustive search up to 4 conditions and reports its size beside the greedy choice.
    let seed = 12345;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    let equal = 0, worst = 0;
    for (let k = 0; k < 200; k++) {
      const nPairs = 6 + Math.floor(rnd() * 6);
      const sets = Array.from({ length: 5 }, () => bits(nPairs, Array.from({ length: nPairs }, (_, i) => i).filter(() => rnd() < 0.5)));
      const g = greedyCover(sets, [0, 1, 2, 3, 4]);
      const e = exactCover(sets, 5);
      if (!g.complete) { expect(e).toBeUndefined(); continue; }
      expect(g.chosen.length).toBeGreaterThanOrEqual(e!.length);
      if (g.chosen.length === e!.length) equal++;
      worst = Math.max(worst, g.chosen.length - e!.length);
    }
    // measured on this seed: equal in 140 of 200, never more than one condition more than the optimum
    expect(equal).toBeGreaterThan(100);
    expect(worst).toBeLessThanOrEqual(1);
  });

  it('the textbook case where greedy is worse (set cover; Johnson 1974): greedy 3, exhaustive 2', () => {
    // elements 0..5; A = {0,1,2}, B = {3,4,5} cover all; C = {0,1,3,4} is larger than A or B, so greedy takes it
    // first and then needs two more: {2} from A and {5} from B.
    const sets = [bits(6, [0, 1, 2]), bits(6, [3, 4, 5]), bits(6, [0, 1, 3, 4])];
    expect(greedyCover(sets, [0, 0, 0]).chosen.length).toBe(3);
    expect(exactCover(sets, 3)!.length).toBe(2);
  });

  it('least-tilt order: points on a line are visited in order from the start (by hand)', () => {
    const pos = [30, 10, 20];
    const order = leastTiltOrder(3, (a, b) => Math.abs((a < 0 ? 0 : pos[a]) - pos[b]));
    expect(order).toEqual([1, 2, 0]);
  });
});

describe('planning for a loop: candidates compared over a patch of columns on the loop', () => {
  // an invented 5 nm prismatic loop b = 1/2[1 0 1] on (1 0 1) at mid-depth of a 100 nm Cu foil
  const loopSc = parseScenario({
    name: 'loop planning test (invented)',
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 100, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    imageX: [1, 0, 0],
    image: { width_px: 32, height_px: 32, pixel_nm: 1 },
    absorption: 0.1,
    conditions: [{ id: 'g200', g: [2, 0, 0], w: 1 }],
    defects: [{ type: 'loop', b: '1/2[1 0 1]', normal: [1, 0, 1], centre_nm: [0, 0, 50], radius_nm: 5 }],
    candidates: ['1/2[1 0 1]', '1/2[1 1 0]'],
  });
  const cands = identificationCandidates(loopSc, 0);
  const label = (b: string) => cands.findIndex((c) => c.label.startsWith(`b = ${b}`));

  it('b and -b (vacancy and interstitial) are told apart at g.b = +-1: the image lies inside the loop for one and outside for the other (inside-outside contrast, Hirsch et al. 1965)', () => {
    const strip = candidateStrips(loopSc, cands, loopSc.conditions[0]);
    const n = cands.length;
    const i = label('1/2[1 0 1]');
    const j = label('1/2[-1 0 -1]');
    expect(i).toBeGreaterThanOrEqual(0);
    expect(j).toBeGreaterThanOrEqual(0);
    expect(strip.endOn).toBe(false);
    expect(strip.difference[i * n + j]).toBeGreaterThanOrEqual(PLAN_DEFAULTS.strip.minDifference);
    // every candidate's patch has contrast (g.b = +-1 for all four here) and the matrix is symmetric with a zero diagonal
    for (let a = 0; a < n; a++) {
      expect(strip.difference[a * n + a]).toBe(0);
      for (let b = 0; b < n; b++) expect(strip.difference[a * n + b]).toBe(strip.difference[b * n + a]);
      expect(Math.max(...strip.contrast[a].map(Math.abs))).toBeGreaterThan(0.1);
    }
  });

  it('plan accepts a loop target and tells its candidates apart (4 candidates: two b, both natures)', () => {
    const r = plan(loopSc, { ...PLAN_DEFAULTS, holder, orientation: orientation([0, 0, 1], [1, 0, 0]), current: { primary_deg: 0, secondary_deg: 0 }, defectIndex: 0, gMax_per_nm: 6, zoneIndexMax: 1 });
    expect(r.candidates).toHaveLength(4);
    expect(r.conditions.length).toBeGreaterThan(0);
    expect(r.complete).toBe(true);
  });
});
