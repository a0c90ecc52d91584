/**
 * Line plots (src/output/graphics/plot.ts): ticks by the 1-2-5 rule (common
 * practice in plotting), clipping of series to the plot area (Liang-Barsky
 * line clipping, checked against hand-computed intersections), and the same
 * plot drawn to PNG and SVG having the same layout.
 */
import { describe, expect, it } from 'vitest';
import pngjs from 'pngjs';
import { clipPolyline, linePlot, PALETTE, type PlotSpec } from '../../src/output/graphics/plot.js';
import { formatTick, niceRange, niceStep } from '../../src/output/graphics/ticks.js';
import { rasterSurface } from '../../src/output/graphics/raster.js';
import { svgSurface } from '../../src/output/graphics/svg.js';
import { plotFigure } from '../../src/output/graphics/figure.js';

describe('ticks (1-2-5 rule, common practice)', () => {
  it('picks 1, 2 or 5 times a power of ten', () => {
    expect(niceStep(1, 5)).toBeCloseTo(0.2, 12); // 0.2 per interval
    expect(niceStep(113.9, 8)).toBe(10); // 14.2 -> 10
    expect(niceStep(0.27, 6)).toBeCloseTo(0.05, 12); // 0.045 -> 0.05
    expect(niceStep(0.3, 10)).toBeCloseTo(0.02, 12); // 0.03 -> 0.02
    expect(niceStep(7000, 4)).toBe(2000); // 1750 -> 2000
  });

  it('extends a data range to whole steps and lists the ticks', () => {
    const r = niceRange(0.013, 0.987, 5);
    expect(r.range[0]).toBe(0);
    expect(r.range[1]).toBeCloseTo(1, 12);
    expect(r.ticks.map((v) => Number(v.toFixed(10)))).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    const d = niceRange(3, 3, 5); // degenerate: widened by 10 %
    expect(d.range[0]).toBeLessThan(3);
    expect(d.range[1]).toBeGreaterThan(3);
  });

  it('formats labels with the decimals of the step and a true minus sign', () => {
    expect(formatTick(-0.1, 0.05)).toBe('\u22120.10');
    expect(formatTick(0.30000000000000004, 0.1)).toBe('0.3');
    expect(formatTick(120, 20)).toBe('120');
    expect(formatTick(3e-6, 1e-6)).toBe('3e\u22126');
    expect(formatTick(1e-17, 0.2)).toBe('0.0');
  });
});

describe('clipping a polyline to the plot area', () => {
  it('cuts segments at the box edges and splits runs that leave and re-enter', () => {
    // box [0, 10] x [0, 10]; the path leaves through x = 10 and comes back
    const runs = clipPolyline([5, 5, 15, 5, 15, 8, 5, 8], 0, 0, 10, 10);
    expect(runs).toEqual([
      [5, 5, 10, 5],
      [10, 8, 5, 8],
    ]);
    // a diagonal crossing the corner region: y = x - 5 from (0,-5) to (20,15) enters at (5,0), leaves at (10,5)
    expect(clipPolyline([0, -5, 20, 15], 0, 0, 10, 10)).toEqual([[5, 0, 10, 5]]);
    // non-finite points break the line
    expect(clipPolyline([1, 1, 2, 2, NaN, 3, 4, 4, 5, 5], 0, 0, 10, 10)).toEqual([
      [1, 1, 2, 2],
      [4, 4, 5, 5],
    ]);
  });
});

/** A plot whose second series overshoots the fixed y range (it must be clipped). */
function spec(): PlotSpec {
  const x = Array.from({ length: 301 }, (_, i) => i / 10);
  return {
    title: 'Test plot \u03be_g = 25 nm',
    xLabel: 'thickness t (nm)',
    yLabel: 'intensity',
    xRange: [0, 30],
    yRange: [0, 1],
    series: [
      { x, y: x.map((v) => Math.cos((Math.PI * v) / 10) ** 2), label: 'bright field', color: PALETTE[0] },
      { x, y: x.map((v) => 1.5 * Math.sin((Math.PI * v) / 10) ** 2), label: 'dark field', color: PALETTE[1], dashed: true },
    ],
    markers: [{ x: 15 }],
    markerLabel: 'marker',
  };
}

const W = 640;
const H = 420;

/** Numbers of an attribute of the first element matching a pattern. */
function attrs(tag: string, svg: string): Record<string, string>[] {
  const out: Record<string, string>[] = [];
  for (const m of svg.matchAll(new RegExp(`<${tag}\\s([^>]*)/?>`, 'g'))) {
    const a: Record<string, string> = {};
    for (const p of m[1].matchAll(/([\w:-]+)="([^"]*)"/g)) a[p[1]] = p[2];
    out.push(a);
  }
  return out;
}

function pathBox(d: string): [number, number, number, number] {
  const nums = (d.match(/-?\d+(\.\d+)?/g) ?? []).map(Number);
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let i = 0; i + 1 < nums.length; i += 2) {
    x0 = Math.min(x0, nums[i]);
    x1 = Math.max(x1, nums[i]);
    y0 = Math.min(y0, nums[i + 1]);
    y1 = Math.max(y1, nums[i + 1]);
  }
  return [x0, y0, x1, y1];
}

describe('the same plot on PNG and SVG', () => {
  const r = rasterSurface(W, H, [255, 255, 255]);
  const layR = linePlot(r, { x: 0, y: 0, w: W, h: H }, spec());
  const v = svgSurface(W, H, [255, 255, 255]);
  const layV = linePlot(v, { x: 0, y: 0, w: W, h: H }, spec());
  const svg = v.toSvg();
  const px = r.pixels();
  const at = (x: number, y: number) => [px[3 * (y * W + x)], px[3 * (y * W + x) + 1], px[3 * (y * W + x) + 2]];

  it('computes the same layout on both surfaces', () => {
    expect(layV.plot).toEqual(layR.plot);
    expect(layV.xTicks).toEqual(layR.xTicks);
    expect(layV.yTicks).toEqual(layR.yTicks);
    expect(layR.xTicks).toEqual([0, 5, 10, 15, 20, 25, 30]);
  });

  it('puts the frame at the same coordinates in the SVG and in the PNG pixels', () => {
    const frame = attrs('rect', svg).find((a) => a.fill === 'none');
    expect(frame).toBeDefined();
    const { x, y, w, h } = layR.plot;
    expect(Number(frame!.x)).toBeCloseTo(x, 2);
    expect(Number(frame!.y)).toBeCloseTo(y, 2);
    expect(Number(frame!.width)).toBeCloseTo(w, 2);
    expect(Number(frame!.height)).toBeCloseTo(h, 2);
    // 1 px frame lines centred on half-pixel coordinates fill whole pixel columns and rows
    const col = Math.floor(x);
    const row = Math.floor(y + h);
    const mid = Math.round(y + h / 2);
    expect(at(col, mid)).toEqual([40, 40, 40]);
    expect(at(col - 1, mid)).toEqual([255, 255, 255]);
    expect(at(Math.round(x + w / 3), row)).toEqual([40, 40, 40]);
  });

  it('draws text at the same place: title ink in the PNG within 1 px of the SVG outline box', () => {
    const title = attrs('path', svg).find((a) => a['aria-label'] === 'Test plot \u03be_g = 25 nm');
    expect(title).toBeDefined();
    const [bx0, by0, bx1, by1] = pathBox(title!.d);
    // PNG ink in the title band (above the legend)
    let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
    for (let yy = 0; yy < Math.ceil(by1) + 3; yy++) {
      for (let xx = 0; xx < W; xx++) {
        const c = at(xx, yy);
        if (c[0] < 250) {
          x0 = Math.min(x0, xx);
          y0 = Math.min(y0, yy);
          x1 = Math.max(x1, xx + 1);
          y1 = Math.max(y1, yy + 1);
        }
      }
    }
    expect(Math.abs(x0 - bx0)).toBeLessThanOrEqual(1);
    expect(Math.abs(x1 - bx1)).toBeLessThanOrEqual(1);
    expect(Math.abs(y0 - by0)).toBeLessThanOrEqual(1);
    expect(Math.abs(y1 - by1)).toBeLessThanOrEqual(1);
  });

  it('clips the series to the plot area in both outputs', () => {
    const { x, y, w, h } = layR.plot;
    // SVG: every series point inside the frame (series are the polylines in a palette colour)
    const hex = (c: readonly number[]) => '#' + c.map((q) => q.toString(16).padStart(2, '0')).join('');
    const lines = attrs('polyline', svg).filter((a) => a.stroke === hex(PALETTE[0]) || a.stroke === hex(PALETTE[1]));
    expect(lines.length).toBeGreaterThan(2); // the overshooting dark field is split into several runs
    for (const l of lines) {
      const nums = l.points.split(/[ ,]/).map(Number);
      for (let i = 0; i < nums.length; i += 2) {
        expect(nums[i]).toBeGreaterThanOrEqual(x - 0.01);
        expect(nums[i]).toBeLessThanOrEqual(x + w + 0.01);
        expect(nums[i + 1]).toBeGreaterThanOrEqual(y - 0.01);
        expect(nums[i + 1]).toBeLessThanOrEqual(y + h + 0.01);
      }
    }
    // PNG: no orange (dark field) ink more than a line width above the frame's top edge, except the legend sample
    let outside = 0;
    for (let yy = Math.floor(y) - 12; yy < Math.floor(y) - 2; yy++) {
      for (let xx = Math.floor(x + 40); xx < Math.floor(x + w); xx++) {
        const c = at(xx, yy);
        if (c[0] > 200 && c[1] < 170 && c[2] < 100) outside++;
      }
    }
    expect(outside).toBe(0);
    // the bright-field curve passes through (t = 2.5, I = 0.5): a pixel within 1.5 px of that point has its colour
    const tx = layR.xToPx(2.5);
    const ty = layR.yToPx(0.5);
    let best = Infinity;
    for (let yy = Math.floor(ty - 1.5); yy <= Math.ceil(ty + 1.5); yy++) {
      for (let xx = Math.floor(tx - 1.5); xx <= Math.ceil(tx + 1.5); xx++) {
        const c = at(xx, yy);
        best = Math.min(best, Math.abs(c[0] - PALETTE[0][0]) + Math.abs(c[1] - PALETTE[0][1]) + Math.abs(c[2] - PALETTE[0][2]));
      }
    }
    expect(best).toBeLessThan(6);
  });

  it('plotFigure returns a decodable PNG and an SVG of the same size', () => {
    const f = plotFigure(spec(), 500, 300);
    const png = pngjs.PNG.sync.read(Buffer.from(f.png));
    expect([png.width, png.height]).toEqual([500, 300]);
    expect(f.svg).toMatch(/width="500" height="300" viewBox="0 0 500 300"/);
  });
});
