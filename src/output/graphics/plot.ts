/**
 * Line plots on any Surface: a framed plot area with ticks by the 1-2-5
 * rule, tick labels, axis labels, an optional title, a legend row above the
 * plot area (so it never hides a curve), optional vertical marker lines, and
 * series clipped to the plot area.
 */
import { formatTick, niceRange, ticksIn } from './ticks.js';
import type { Box, RGB, Surface } from './types.js';

/**
 * Our series colours: plain, distinguishable by people with the common
 * colour-vision deficiencies (blue/orange contrast first), and dark enough
 * to read on white.
 */
export const PALETTE: readonly RGB[] = [
  [25, 60, 135], // dark blue
  [225, 115, 10], // orange
  [0, 135, 125], // teal
  [185, 40, 135], // magenta
  [105, 105, 105], // grey
  [125, 90, 25], // brown
  [70, 155, 220], // sky blue
];

export interface PlotSeries {
  readonly x: ArrayLike<number>;
  readonly y: ArrayLike<number>;
  readonly label: string;
  readonly color: RGB;
  readonly dashed?: boolean;
  /** px, default 1.75 */
  readonly lineWidth?: number;
}

export interface PlotMarker {
  /** data x of a vertical line across the plot area */
  readonly x: number;
  readonly color?: RGB;
}

export interface PlotSpec {
  readonly title?: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly series: readonly PlotSeries[];
  readonly xRange?: readonly [number, number];
  readonly yRange?: readonly [number, number];
  /** vertical dashed lines, e.g. positions of atomic planes */
  readonly markers?: readonly PlotMarker[];
  /** legend text for the markers (no legend entry when absent) */
  readonly markerLabel?: string;
}

export interface PlotLayout {
  /** the framed plot area, px */
  readonly plot: Box;
  readonly xRange: readonly [number, number];
  readonly yRange: readonly [number, number];
  readonly xTicks: readonly number[];
  readonly yTicks: readonly number[];
  xToPx(v: number): number;
  yToPx(v: number): number;
}

const TITLE_SIZE = 16;
const MIN_TITLE_SIZE = 8;
const LABEL_SIZE = 14;
const TICK_SIZE = 12;
const LEGEND_SIZE = 12;
const PAD = 8;
const TICK_LEN = 5;
const SAMPLE_LEN = 26;
const FRAME: RGB = [40, 40, 40];
const GRID: RGB = [228, 228, 228];
const MARKER: RGB = [120, 120, 120];
const INK: RGB = [0, 0, 0];
const DASH = [7, 4];

/** Centre of the pixel column or row containing v: 1-px lines drawn there stay sharp. */
function crisp(v: number): number {
  return Math.floor(v + 1e-6) + 0.5;
}
const MARKER_DASH = [3, 3];

function dataExtent(series: readonly PlotSeries[], axis: 'x' | 'y'): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) {
    const a = s[axis];
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (Number.isFinite(v)) {
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
  }
  return lo <= hi ? [lo, hi] : [0, 1];
}

function axis(given: readonly [number, number] | undefined, extent: [number, number], target: number) {
  if (given) {
    const [lo, hi] = given;
    if (!(Number.isFinite(lo) && Number.isFinite(hi) && hi > lo)) throw new RangeError(`plot range [${lo}, ${hi}] must be finite and increasing`);
    const step = niceRange(lo, hi, target).step;
    return { range: [lo, hi] as [number, number], step, ticks: ticksIn(lo, hi, step) };
  }
  return niceRange(extent[0], extent[1], target);
}

/**
 * Cut a polyline (px) at the rectangle [x0, x1] x [y0, y1] (Liang-Barsky per
 * segment); non-finite points break the line. Returns the visible runs.
 */
export function clipPolyline(p: readonly number[], x0: number, y0: number, x1: number, y1: number): number[][] {
  const runs: number[][] = [];
  let cur: number[] = [];
  const flush = () => {
    if (cur.length >= 4) runs.push(cur);
    cur = [];
  };
  const n = p.length >> 1;
  for (let i = 0; i + 1 < n; i++) {
    const ax = p[2 * i], ay = p[2 * i + 1], bx = p[2 * i + 2], by = p[2 * i + 3];
    if (!(Number.isFinite(ax) && Number.isFinite(ay) && Number.isFinite(bx) && Number.isFinite(by))) {
      flush();
      continue;
    }
    const dx = bx - ax;
    const dy = by - ay;
    let t0 = 0;
    let t1 = 1;
    let visible = true;
    const edges: [number, number][] = [
      [-dx, ax - x0],
      [dx, x1 - ax],
      [-dy, ay - y0],
      [dy, y1 - ay],
    ];
    for (const [pp, q] of edges) {
      if (pp === 0) {
        if (q < 0) {
          visible = false;
          break;
        }
        continue;
      }
      const r = q / pp;
      if (pp < 0) {
        if (r > t1) {
          visible = false;
          break;
        }
        if (r > t0) t0 = r;
      } else {
        if (r < t0) {
          visible = false;
          break;
        }
        if (r < t1) t1 = r;
      }
    }
    if (!visible) {
      flush();
      continue;
    }
    if (t0 > 0) flush();
    if (cur.length === 0) cur.push(ax + t0 * dx, ay + t0 * dy);
    cur.push(ax + t1 * dx, ay + t1 * dy);
    if (t1 < 1) flush();
  }
  flush();
  return runs;
}

/** Smallest distance between kept polyline points, px (finer detail is invisible). */
const MIN_POINT_SPACING_PX = 0.25;

/** Drop points closer than `spacing` to the last kept one (the last point is always kept). */
export function thinPolyline(p: readonly number[], spacing = MIN_POINT_SPACING_PX): number[] {
  const n = p.length >> 1;
  if (n <= 2) return Array.from(p);
  const out = [p[0], p[1]];
  for (let i = 1; i < n - 1; i++) {
    const k = out.length;
    if (Math.hypot(p[2 * i] - out[k - 2], p[2 * i + 1] - out[k - 1]) >= spacing) out.push(p[2 * i], p[2 * i + 1]);
  }
  out.push(p[2 * n - 2], p[2 * n - 1]);
  return out;
}

interface LegendEntry {
  readonly label: string;
  readonly color: RGB;
  readonly dash?: readonly number[];
  readonly lineWidth: number;
}

/** Draw a line plot into box on the surface; returns where everything went. */
export function linePlot(surface: Surface, box: Box, spec: PlotSpec): PlotLayout {
  for (const s of spec.series) {
    if (s.x.length !== s.y.length) throw new RangeError(`series "${s.label}": x has ${s.x.length} values, y ${s.y.length}`);
  }
  const xAxis = axis(spec.xRange, dataExtent(spec.series, 'x'), Math.max(3, Math.min(10, Math.round(box.w / 90))));
  const yAxis = axis(spec.yRange, dataExtent(spec.series, 'y'), Math.max(3, Math.min(8, Math.round(box.h / 60))));
  const xLabels = xAxis.ticks.map((v) => formatTick(v, xAxis.step));
  const yLabels = yAxis.ticks.map((v) => formatTick(v, yAxis.step));

  // horizontal layout
  const yTickW = Math.max(0, ...yLabels.map((s) => surface.measureText(s, TICK_SIZE)));
  const left = Math.round(box.x + PAD + LABEL_SIZE * 1.25 + 6 + yTickW + 4 + TICK_LEN) + 0.5;
  const lastHalf = xLabels.length > 0 ? surface.measureText(xLabels[xLabels.length - 1], TICK_SIZE) / 2 : 0;
  const right = Math.round(box.x + box.w - PAD - Math.max(6, lastHalf)) + 0.5;

  // legend rows between the title and the plot area
  const entries: LegendEntry[] = spec.series.map((s) => ({
    label: s.label,
    color: s.color,
    dash: s.dashed ? DASH : undefined,
    lineWidth: s.lineWidth ?? 1.75,
  }));
  if (spec.markerLabel && spec.markers && spec.markers.length > 0) {
    entries.push({ label: spec.markerLabel, color: spec.markers[0].color ?? MARKER, dash: MARKER_DASH, lineWidth: 1 });
  }
  const rowH = LEGEND_SIZE * 1.6;
  const placed: { e: LegendEntry; x: number; row: number }[] = [];
  {
    let x = left;
    let row = 0;
    for (const e of entries) {
      const w = SAMPLE_LEN + 6 + surface.measureText(e.label, LEGEND_SIZE) + 18;
      if (x > left && x + w - 18 > right) {
        row++;
        x = left;
      }
      placed.push({ e, x, row });
      x += w;
    }
  }
  const legendRows = placed.length > 0 ? placed[placed.length - 1].row + 1 : 0;
  const titleH = spec.title ? TITLE_SIZE * 1.6 : 0;
  const legendTop = box.y + PAD + titleH;
  const top = Math.round(legendTop + legendRows * rowH + (legendRows > 0 ? 6 : 0)) + 0.5;
  const bottom = Math.round(box.y + box.h - PAD - LABEL_SIZE * 1.35 - TICK_SIZE * 1.3 - TICK_LEN - 6) + 0.5;
  if (!(right - left > 20 && bottom - top > 20)) throw new RangeError(`plot box ${box.w} x ${box.h} px is too small for the labels`);

  const [xa, xb] = xAxis.range;
  const [ya, yb] = yAxis.range;
  const xToPx = (v: number) => left + ((v - xa) / (xb - xa)) * (right - left);
  const yToPx = (v: number) => bottom - ((v - ya) / (yb - ya)) * (bottom - top);

  // grid
  for (const v of xAxis.ticks) {
    const px = crisp(xToPx(v));
    if (px > left + 0.5 && px < right - 0.5) surface.line(px, top, px, bottom, GRID, 1);
  }
  for (const v of yAxis.ticks) {
    const py = crisp(yToPx(v));
    if (py > top + 0.5 && py < bottom - 0.5) surface.line(left, py, right, py, GRID, 1);
  }
  // markers
  for (const m of spec.markers ?? []) {
    const px = Math.min(right, crisp(xToPx(m.x)));
    if (xToPx(m.x) >= left - 1e-9 && xToPx(m.x) <= right + 1e-9) surface.line(px, top, px, bottom, m.color ?? MARKER, 1, MARKER_DASH);
  }
  // series
  for (const s of spec.series) {
    const pts: number[] = [];
    for (let i = 0; i < s.x.length; i++) pts.push(xToPx(s.x[i]), yToPx(s.y[i]));
    for (const run of clipPolyline(pts, left, top, right, bottom)) {
      surface.polyline(thinPolyline(run), s.color, s.lineWidth ?? 1.75, s.dashed ? DASH : undefined);
    }
  }
  // frame, ticks, tick labels
  surface.strokeRect(left, top, right - left, bottom - top, FRAME, 1);
  xAxis.ticks.forEach((v, i) => {
    const px = Math.min(right, crisp(xToPx(v)));
    surface.line(px, bottom, px, bottom + TICK_LEN, FRAME, 1);
    surface.text(xLabels[i], px, bottom + TICK_LEN + 3, { size: TICK_SIZE, anchor: 'middle', baseline: 'top', color: INK });
  });
  yAxis.ticks.forEach((v, i) => {
    const py = Math.min(bottom, crisp(yToPx(v)));
    surface.line(left - TICK_LEN, py, left, py, FRAME, 1);
    surface.text(yLabels[i], left - TICK_LEN - 4, py, { size: TICK_SIZE, anchor: 'end', baseline: 'middle', color: INK });
  });
  // axis labels and title
  surface.text(spec.xLabel, (left + right) / 2, box.y + box.h - PAD - 0.3 * LABEL_SIZE, { size: LABEL_SIZE, anchor: 'middle', color: INK });
  surface.text(spec.yLabel, box.x + PAD + 0.95 * LABEL_SIZE, (top + bottom) / 2, {
    size: LABEL_SIZE,
    anchor: 'middle',
    rotate_deg: 90,
    color: INK,
  });
  if (spec.title) {
    // shrink a long title to the width of the box (not below MIN_TITLE_SIZE)
    const avail = box.w - 2 * PAD;
    const full = surface.measureText(spec.title, TITLE_SIZE, true);
    const size = full > avail ? Math.max(MIN_TITLE_SIZE, (TITLE_SIZE * avail) / full) : TITLE_SIZE;
    const cx = full > avail ? box.x + box.w / 2 : (left + right) / 2;
    surface.text(spec.title, cx, box.y + PAD, { size, anchor: 'middle', baseline: 'top', bold: true, color: INK });
  }
  // legend
  for (const { e, x, row } of placed) {
    const cy = legendTop + row * rowH + rowH / 2;
    surface.line(x, cy, x + SAMPLE_LEN, cy, e.color, e.lineWidth, e.dash);
    surface.text(e.label, x + SAMPLE_LEN + 6, cy, { size: LEGEND_SIZE, baseline: 'middle', color: INK });
  }
  return {
    plot: { x: left, y: top, w: right - left, h: bottom - top },
    xRange: xAxis.range,
    yRange: yAxis.range,
    xTicks: xAxis.ticks,
    yTicks: yAxis.ticks,
    xToPx,
    yToPx,
  };
}
