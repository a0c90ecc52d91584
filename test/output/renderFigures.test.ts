/**
 * Annotated figures of rendered images (src/output/renderFigures.ts) and the
 * geometry written beside them (src/geometry/conditionGeometry.ts).
 *
 * The images here are made by hand (a background with a dip of known depth),
 * not rendered: these tests check the drawing and the bookkeeping, not the
 * physics. The expected g directions are worked by hand from the frame
 * convention (+x = imageX, +y = beam x imageX, pointing down; angles
 * counter-clockwise on the screen), independently of the code.
 */
import { describe, expect, it } from 'vitest';
import pngjs from 'pngjs';
import { scenario } from '../imaging/helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import type { ConditionImages } from '../../src/imaging/renderScenario.js';
import { conditionGeometry, nearestZone, screenAngle_deg } from '../../src/geometry/conditionGeometry.js';
import { formatPlaneIn } from '../../src/crystal/formatIndices.js';
import { conditionFigure, conditionLabel, contactSheet, contrastNote, displayWindows } from '../../src/output/renderFigures.js';
import { blurImages } from '../../src/analysis/pointSpread.js';
import { directionToCartesian, makeLattice } from '../../src/crystal/lattice.js';
import { imageFrame } from '../../src/geometry/frames.js';

const W = 96;
const H = 64;
const PIXEL = 0.5;

/** A flat image at `bg` with a vertical dark band (columns 40..47) at bg * depth. */
function banded(bg: number, depth: number): Float32Array {
  const a = new Float32Array(W * H).fill(bg);
  for (let j = 0; j < H; j++) for (let i = 40; i < 48; i++) a[j * W + i] = bg * depth;
  return a;
}

function fakeImages(): ConditionImages[] {
  const sc = scenario({
    image: { width_px: W, height_px: H, pixel_nm: PIXEL },
    conditions: [
      { id: 'g200', g: [2, 0, 0], w: 0.5 },
      { id: 'g020', g: [0, 2, 0], w: 0.5 },
      { id: 'g2m20', g: [2, -2, 0], w: 0.5 },
    ],
  });
  const depths = [0.5, 0.9, 0.8];
  return sc.conditions.map((c, i) => {
    const rc = resolveCondition(sc, c);
    return {
      condition: rc,
      width: W,
      height: H,
      pixel_nm: PIXEL,
      bf: banded(0.6, depths[i]),
      df: banded(0.2, 2 - depths[i]),
      background: { bf: 0.6, df: 0.2 },
      slices: 0,
      coreMask: new Uint8Array(W * H),
    };
  });
}

function decode(png: Uint8Array) {
  const p = pngjs.PNG.sync.read(Buffer.from(png));
  return { w: p.width, h: p.height, grey: (x: number, y: number) => p.data[4 * (Math.round(y) * p.width + Math.round(x))] };
}

describe('g direction and image frame in crystal terms', () => {
  it('beam [001], imageX [100]: g = 200 points along +x (0 deg), 020 down the image (-90 deg), 2-20 up-right (+45 deg) (worked by hand)', () => {
    const imgs = fakeImages();
    const l = imgs[0].condition.frame;
    expect(l.ey[1]).toBeCloseTo(1, 12); // ey = ez x ex = [001] x [100] = [010]
    const angles = imgs.map((ci) => conditionGeometry(scenario({}).material.lattice, ci.condition.frame, ci.condition.g_cart).gAngle_deg);
    expect(angles[0]).toBeCloseTo(0, 9);
    expect(angles[1]).toBeCloseTo(-90, 9);
    expect(angles[2]).toBeCloseTo(45, 9);
  });

  it('a tilted beam [0 1 1] with imageX [1 0 0]: +y = [0 1 -1]/sqrt2 x ... , g = (0 1 -1) points down-screen (worked by hand)', () => {
    const lat = makeLattice('cubic', { a: 0.36 });
    const ez = directionToCartesian(lat, [0, 1, 1]);
    const f = imageFrame(ez, directionToCartesian(lat, [1, 0, 0]), directionToCartesian(lat, [0, 0, 1]), 100);
    // ey = ez x ex = [0 1 1]/sqrt2 x [1 0 0] = [0 1 -1]/sqrt2
    expect(f.ey[1]).toBeCloseTo(Math.SQRT1_2, 12);
    expect(f.ey[2]).toBeCloseTo(-Math.SQRT1_2, 12);
    const g = conditionGeometry(lat, f, [0, 1 / 0.36, -1 / 0.36]);
    expect(g.gAngle_deg).toBeCloseTo(-90, 9);
    expect(g.imageY).toEqual([0, 1, -1]);
    expect(g.nearestZone.text).toBe('[0 1 1]');
    expect(g.nearestZone.angle_deg).toBeCloseTo(0, 4);
  });

  it('nearest low-index zone of a beam 3 degrees off [001] about [100] is [001] at 3 degrees', () => {
    const lat = makeLattice('cubic', { a: 0.4 });
    const t = (3 * Math.PI) / 180;
    const z = nearestZone(lat, [0, Math.sin(t), Math.cos(t)]);
    expect(z.text).toBe('[0 0 1]');
    expect(z.angle_deg).toBeCloseTo(3, 6);
  });

  it('hexagonal crystals print four indices: beam [0001], the reflection (1 0 -1 0), zone [0 0 0 1]', () => {
    const lat = makeLattice('hexagonal', { a: 0.321, c: 0.521 });
    const ez = directionToCartesian(lat, [0, 0, 1]);
    const f = imageFrame(ez, directionToCartesian(lat, [1, 0, 0]), ez, 100);
    const g = conditionGeometry(lat, f, [1, 0, 0]);
    expect(g.beam).toEqual([0, 0, 0, 1]);
    expect(g.text.beam).toBe('[0 0 0 1]');
    expect(g.nearestZone.text).toBe('[0 0 0 1]');
    expect(formatPlaneIn(lat, [1, 0, 0])).toBe('(1 0 -1 0)');
    // imageX = [1 0 0] (3 indices) = 1/3[2 -1 -1 0] (Williams & Carter 2009, ch. 18, rule u = (2U - V)/3 ...)
    expect(g.imageX).toEqual([1, -0.5, -0.5, 0]);
  });

  it('screen angle of a vector along +y of the image is -90 degrees (y points down)', () => {
    const f = imageFrame([0, 0, 1], [1, 0, 0], [0, 0, 1], 10);
    expect(screenAngle_deg(f, [0, 1, 0])).toBeCloseTo(-90, 12);
  });
});

describe('condition figure', () => {
  const imgs = fakeImages();
  const sc = scenario({});
  const geos = imgs.map((ci) => conditionGeometry(sc.material.lattice, ci.condition.frame, ci.condition.g_cart));
  const { windows, scales } = displayWindows(imgs, 'shared');
  const note = contrastNote(scales, windows);

  it('the scale bar measured on the PNG is its label divided by the pixel size, times the drawing scale', () => {
    const fig = conditionFigure(imgs[0], geos[0], windows[0], note, 'test');
    const p = decode(fig.png);
    for (const panel of fig.panels) {
      const bar = panel.scaleBar;
      // the white run through the bar's centre on its middle row, bounded by the black frame
      const mid = Math.round((bar.x0 + bar.x1) / 2);
      expect(p.grey(mid, bar.y)).toBeGreaterThan(200);
      let first = mid;
      let last = mid;
      while (p.grey(first - 1, bar.y) > 127) first--;
      while (p.grey(last + 1, bar.y) > 127) last++;
      const expected = (bar.length_nm / PIXEL) * panel.scale;
      expect(Math.abs(last - first + 1 - expected)).toBeLessThanOrEqual(2);
      // 1-2-5 series
      expect([1, 2, 5]).toContain(Number((bar.length_nm / 10 ** Math.floor(Math.log10(bar.length_nm))).toPrecision(6)));
    }
  });

  it('the g arrow points along the reported g direction', () => {
    imgs.forEach((ci, i) => {
      const fig = conditionFigure(ci, geos[i], windows[i], note, 'test');
      for (const panel of fig.panels) {
        const a = panel.arrow;
        const angle = (Math.atan2(-(a.y1 - a.y0), a.x1 - a.x0) * 180) / Math.PI;
        expect(angle).toBeCloseTo(geos[i].gAngle_deg, 6);
      }
    });
  });

  it('shared contrast: the ratio of two conditions’ band contrast measured on the PNG is within 2 % of the float images’', () => {
    const sheet = contactSheet(imgs, geos, windows, note, 'test');
    const p = decode(sheet.png);
    const measure = (panelIndex: number) => {
      const panel = sheet.panels[panelIndex];
      const { box, scale } = panel;
      const y = box.y + 0.5 * box.h;
      const band = p.grey(box.x + 43.5 * scale, y);
      const flat = p.grey(box.x + 20.5 * scale, y);
      return flat - band;
    };
    // panels: [cond0 bf, cond0 df, cond1 bf, cond1 df, ...]
    const ratioPng = measure(0) / measure(2);
    const ratioFloat = (1 - 0.5) / (1 - 0.9);
    // the weaker band spans about 50 grey levels, so 8-bit rounding alone stays below 1 %
    expect(measure(2)).toBeGreaterThan(40);
    expect(Math.abs(ratioPng / ratioFloat - 1)).toBeLessThan(0.02);
  });

  it('each-image contrast stretches every image to the full grey range (and says so)', () => {
    const each = displayWindows(imgs, 'each');
    expect(contrastNote(each.scales, each.windows)).toMatch(/on its own/);
    const sheet = contactSheet(imgs, geos, each.windows, '', 'test');
    const p = decode(sheet.png);
    const panel = sheet.panels[2];
    const band = p.grey(panel.box.x + 43.5 * panel.scale, panel.box.y + 0.5 * panel.box.h);
    expect(band).toBeLessThan(5); // the weak 10 % band is black when stretched on its own
  });

  it('a faint dark-field background gets its own scale from zero, and the note says so', () => {
    const faint = imgs.map((ci) => ({ ...ci, df: banded(0.001, 5), background: { bf: ci.background.bf, df: 0.001 } }));
    const r = displayWindows(faint, 'shared');
    expect(r.windows[0][1]).toEqual({ lo: 0, hi: expect.closeTo(0.005, 6), kind: 'own' });
    expect(contrastNote(r.scales, r.windows)).toMatch(/own scale/);
  });
});

describe('point spread (--blur-nm)', () => {
  it('blurs a single bright pixel into a Gaussian of the stated standard deviation (second moment sigma^2, unit sum)', () => {
    const ci = fakeImages()[0];
    const delta = new Float32Array(W * H);
    delta[32 * W + 48] = 1;
    const sigma_nm = 1.5;
    const [b] = blurImages([{ ...ci, bf: delta, df: delta }], sigma_nm);
    let sum = 0;
    let m2 = 0;
    for (let i = 0; i < W; i++) {
      const v = b.bf[32 * W + i];
      const x = (i - 48) * PIXEL;
      // separable: the row through the centre, normalised, has the 1D variance
      sum += v;
      m2 += v * x * x;
    }
    expect(m2 / sum).toBeCloseTo(sigma_nm * sigma_nm, 2);
    let total = 0;
    for (const v of b.bf) total += v;
    expect(total).toBeCloseTo(1, 5);
  });
});

describe('condition header', () => {
  it('a beam set {200, 400} with g = 200 is 3 beams: 000, g and 400 (the parser puts g into the set once)', () => {
    const sc = scenario({ conditions: [{ id: 's', g: [2, 0, 0], w: 0.5, beams: { set: [[2, 0, 0], [4, 0, 0]] } }] });
    const rc = resolveCondition(sc, sc.conditions[0]);
    const ci = { condition: rc, width: 4, height: 4, pixel_nm: 1, bf: new Float32Array(16), df: new Float32Array(16), background: { bf: 0.5, df: 0.2 }, slices: 0, coreMask: new Uint8Array(16) };
    expect(conditionLabel(ci).beams).toBe('3-beam set');
  });
});
