/**
 * Work identification no longer does twice, checked against doing it:
 *  - simulateView along the line renders only the rows its sampling reads;
 *    the view must equal, to the last bit, the view sampled from the whole
 *    square render (rendered and sampled here independently, as the square
 *    path did it);
 *  - renderCache returns a remembered render only for an identical scenario.
 * Plumbing, not physics (the renders themselves are checked in test/imaging).
 */
import { describe, expect, it } from 'vitest';
import { scenario } from '../imaging/helpers.js';
import { renderScenario } from '../../src/imaging/renderScenario.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';
import { scenarioFrame } from '../../src/imaging/scenarioFrame.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { simulateView, type Renderer } from '../../src/analysis/simulateView.js';
import { cachedRenderer } from '../../src/analysis/renderCache.js';
import { conditionViewAlong, viewAxis } from '../../src/analysis/identifyView.js';
import { bilinear, gaussianBlur } from '../../src/analysis/preprocess.js';
import { DEFAULT_SETTINGS } from '../../src/analysis/identifySettings.js';
import type { PreparedMicrograph } from '../../src/analysis/identifyMicrographs.js';
import { directionToCartesian } from '../../src/crystal/lattice.js';
import type { Scenario } from '../../src/scenario/types.js';
import type { Vec3 } from '../../src/math/vec3.js';

const pool = createRenderPool(1);
const render: Renderer = (s) => renderScenario(s, pool);

const sc = scenario({
  surfaces: 'infinite',
  foil: { thickness_nm: 60, normal: [0, 0, 1] },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [3, 1, 1], point_nm: [0, 0, 30] }],
});

function micrograph(s: Scenario, gAngle_deg: number, mirrored: boolean, field: 'bf' | 'df'): PreparedMicrograph {
  const condition = s.conditions[0];
  return {
    conditionId: condition.id,
    condition,
    resolved: resolveCondition(s, condition),
    settings: { ...DEFAULT_SETTINGS, field, pixel_nm: 1, gAngle_deg, blur_nm: 0.7, mirrored },
    source: 'test',
    synthetic: true,
    filePixel_nm: 1,
    pixelFrom: 'scenario',
    bin: 1,
    crop: [0, 0, 20, 20],
    width: 20,
    height: 20,
    pixel_nm: 1,
    image: { width: 20, height: 20, data: new Float64Array(400) },
    contrast: new Float64Array(400),
    margin: 4,
    gAngle_deg,
  } as PreparedMicrograph;
}

/** The view sampled from the whole side x side render along the line (what simulateView did before it dropped rows). */
async function squareView(s: Scenario, m: PreparedMicrograph): Promise<Float64Array> {
  const W = m.width + 2 * m.margin;
  const H = m.height + 2 * m.margin;
  const p = m.pixel_nm;
  const angle = m.settings.mirrored ? -m.gAngle_deg : m.gAngle_deg;
  const axis = viewAxis(s, m.condition, angle);
  const ez = scenarioFrame(s, m.condition.beam).ez;
  const d = s.defects[0] as { line: Vec3 };
  const u = directionToCartesian(s.material.lattice, d.line);
  const k = u[0] * ez[0] + u[1] * ez[1] + u[2] * ez[2];
  const up: Vec3 = [u[0] - k * ez[0], u[1] - k * ez[1], u[2] - k * ez[2]];
  const n = Math.hypot(...up);
  const line: Vec3 = [up[0] / n, up[1] / n, up[2] / n];
  const side = Math.ceil(Math.hypot(W, H)) + 4;
  const ci = (await render(conditionViewAlong(s, m.condition, line, side, side, p)))[0];
  const src = m.settings.field === 'bf' ? ci.bf : ci.df;
  const bg = ci.background[m.settings.field];
  const fT = scenarioFrame(s, m.condition.beam, axis);
  const fA = scenarioFrame(s, m.condition.beam, line);
  const dot = (a: Vec3, b: Vec3) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
  const rel = new Float64Array(W * H);
  for (let j = 0; j < H; j++) {
    const jv = m.settings.mirrored ? H - 1 - j : j;
    const Y = (jv + 0.5 - H / 2) * p;
    for (let i = 0; i < W; i++) {
      const X = (i + 0.5 - W / 2) * p;
      const xa = X * dot(fT.ex, fA.ex) + Y * dot(fT.ey, fA.ex);
      const ya = X * dot(fT.ex, fA.ey) + Y * dot(fT.ey, fA.ey);
      rel[j * W + i] = bilinear(src, side, side, xa / p + side / 2 - 0.5, ya / p + side / 2 - 0.5) / bg - 1;
    }
  }
  return gaussianBlur(new Float64Array(W * H), rel, W, H, Math.sqrt((m.settings.blur_nm / p) ** 2 + 1 / 12));
}

describe('simulateView along the line renders only the rows it samples', () => {
  it('equals the view sampled from the whole square render, bit for bit (g along, across and oblique to the line; mirrored; dark field)', async () => {
    const asked: number[] = [];
    const counting: Renderer = (s) => {
      asked.push(s.image.height_px / s.image.width_px);
      return render(s);
    };
    for (const [angle, mirrored, field] of [
      [0, false, 'bf'],
      [75, false, 'df'],
      [-130, true, 'bf'],
      [200, false, 'bf'],
    ] as const) {
      const m = micrograph(sc, angle, mirrored, field);
      const got = await simulateView(sc, m, counting);
      expect(Array.from(got)).toEqual(Array.from(await squareView(sc, m)));
    }
    // some views are turned far enough from the line that rows are dropped (otherwise this test would not test it)
    expect(Math.min(...asked)).toBeLessThan(0.9);
    expect(Math.max(...asked)).toBeLessThanOrEqual(1);
  });
});

describe('renderCache', () => {
  it('renders a scenario once, returns the same images for an identical one, renders a changed one, and does not keep failures', async () => {
    let calls = 0;
    const counting: Renderer = (s) => {
      calls++;
      if (s.name === 'fails') return Promise.reject(new Error('no'));
      return render(s);
    };
    const cache = cachedRenderer(counting);
    const small = { ...sc, image: { width_px: 12, height_px: 10, pixel_nm: 1 } };
    const a = await cache(small);
    const b = await cache(JSON.parse(JSON.stringify(small)) as Scenario);
    expect(b).toBe(a);
    expect(calls).toBe(1);
    const c = await cache({ ...small, thickness_nm: 61 });
    expect(c).not.toBe(a);
    expect(calls).toBe(2);
    await expect(cache({ ...small, name: 'fails' })).rejects.toThrow('no');
    await expect(cache({ ...small, name: 'fails' })).rejects.toThrow('no');
    expect(calls).toBe(4);
    expect(cache.stats).toEqual({ hits: 1, misses: 4 });
  });

  it('drops the least recently used images beyond its memory bound', async () => {
    let calls = 0;
    const counting: Renderer = (s) => {
      calls++;
      return render(s);
    };
    // one 12 x 10 render holds 120 x (4 + 4 + 1) bytes; room for two
    const cache = cachedRenderer(counting, 2 * 120 * 9);
    const at = (t: number): Scenario => ({ ...sc, thickness_nm: t, image: { width_px: 12, height_px: 10, pixel_nm: 1 } });
    await cache(at(50));
    await cache(at(51));
    await cache(at(50)); // 50 is now the most recent
    await cache(at(52)); // drops 51
    expect(calls).toBe(3);
    await cache(at(50));
    expect(calls).toBe(3);
    await cache(at(51));
    expect(calls).toBe(4);
  });
});
