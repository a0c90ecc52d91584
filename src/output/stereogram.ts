/**
 * The plan drawn as a stereographic projection of beam directions in the
 * specimen's zero-tilt frame (X, the primary tilt axis, to the right; Y up;
 * the foil normal at the centre): the region the holder reaches (shaded),
 * the zone axes in it (open squares), the chosen two-beam conditions (filled
 * discs, numbered in the order of taking them) and the tilt path between
 * them (great-circle arcs). Projection: p = (v_X, v_Y) / (1 + v_Z).
 */
import type { Vec3 } from '../math/vec3.js';
import { drawFigure, type Figure } from './graphics/figure.js';
import type { RGB, Surface } from './graphics/types.js';

export interface StereoPoint {
  /** Unit beam direction in the zero-tilt frame (X, Y, Z). */
  readonly v: Vec3;
  readonly label: string;
}

export interface StereogramSpec {
  readonly title: string;
  /** Boundary of the reachable region as beam directions (closed loop). */
  readonly region: readonly Vec3[];
  readonly zones: readonly StereoPoint[];
  /** Chosen conditions in the order of taking them. */
  readonly steps: readonly StereoPoint[];
  /** Other reachable conditions (small dots). */
  readonly others: readonly StereoPoint[];
  readonly start: Vec3;
}

const REGION: RGB = [222, 235, 226];
const REGION_EDGE: RGB = [92, 140, 110];
const GRID: RGB = [200, 200, 200];
const ZONE: RGB = [40, 40, 40];
const CHOSEN: RGB = [176, 58, 46];
const PATH: RGB = [212, 140, 30];
const OTHER: RGB = [120, 120, 160];

const proj = (v: Vec3): [number, number] => [v[0] / (1 + v[2]), v[1] / (1 + v[2])];

/** Points along the great circle from a to b (unit vectors). */
function arc(a: Vec3, b: Vec3, n = 24): Vec3[] {
  const c = Math.max(-1, Math.min(1, a[0] * b[0] + a[1] * b[1] + a[2] * b[2]));
  const om = Math.acos(c);
  if (om < 1e-9) return [a, b];
  const out: Vec3[] = [];
  for (let i = 0; i <= n; i++) {
    const t = i / n;
    const p = Math.sin((1 - t) * om) / Math.sin(om), q = Math.sin(t * om) / Math.sin(om);
    out.push([p * a[0] + q * b[0], p * a[1] + q * b[1], p * a[2] + q * b[2]]);
  }
  return out;
}

export function stereogramFigure(spec: StereogramSpec, size = 640): Figure {
  // radius shown: the largest angle in the drawing plus a margin, in steps of 10 degrees
  const all = [...spec.region, ...spec.zones.map((z) => z.v), ...spec.steps.map((s) => s.v), spec.start];
  let maxDeg = 10;
  for (const v of all) maxDeg = Math.max(maxDeg, (Math.acos(Math.max(-1, Math.min(1, v[2]))) * 180) / Math.PI);
  const shownDeg = Math.min(90, Math.ceil((maxDeg + 5) / 10) * 10);
  const rShown = Math.tan((shownDeg * Math.PI) / 360);
  const top = 40, pad = 30;
  const R = (size - top - 2 * pad) / 2;
  const cx = size / 2, cy = top + pad + R;
  const toPx = (v: Vec3): [number, number] => {
    const [x, y] = proj(v);
    return [cx + (R * x) / rShown, cy - (R * y) / rShown];
  };
  return drawFigure(size, size, (s: Surface) => {
    let fs = 15;
    while (fs > 8 && s.measureText(spec.title, fs, true) > size - 16) fs--;
    s.text(spec.title, size / 2, 24, { size: fs, anchor: 'middle', bold: true });
    // reachable region
    const region: number[] = [];
    for (const v of spec.region) region.push(...toPx(v));
    s.polygon(region, REGION);
    s.polyline([...region, region[0], region[1]], REGION_EDGE, 1.5);
    // angle rings every 10 degrees and the X, Y axes
    for (let d = 10; d <= shownDeg; d += 10) {
      const r = (R * Math.tan((d * Math.PI) / 360)) / rShown;
      const pts: number[] = [];
      for (let i = 0; i <= 96; i++) pts.push(cx + r * Math.cos((i * Math.PI) / 48), cy + r * Math.sin((i * Math.PI) / 48));
      s.polyline(pts, GRID, d === shownDeg ? 1.5 : 0.8, d === shownDeg ? undefined : [3, 4]);
      s.text(`${d} deg`, cx + r * Math.SQRT1_2 + 2, cy + r * Math.SQRT1_2 + 11, { size: 10, color: [150, 150, 150] });
    }
    s.line(cx - R, cy, cx + R, cy, GRID, 0.8);
    s.line(cx, cy - R, cx, cy + R, GRID, 0.8);
    s.text('primary tilt axis', cx + R, cy - 5, { size: 11, anchor: 'end', color: [110, 110, 110] });
    // other reachable conditions
    for (const o of spec.others) {
      const [x, y] = toPx(o.v);
      s.fillRect(x - 2, y - 2, 4, 4, OTHER);
    }
    // zones
    for (const z of spec.zones) {
      const [x, y] = toPx(z.v);
      s.strokeRect(x - 4, y - 4, 8, 8, ZONE, 1.2);
      s.text(z.label, x + 6, y - 6, { size: 11, color: ZONE });
    }
    // tilt path
    let prev = spec.start;
    for (const st of spec.steps) {
      const pts: number[] = [];
      for (const v of arc(prev, st.v)) pts.push(...toPx(v));
      s.polyline(pts, PATH, 2.2);
      prev = st.v;
    }
    const [sx, sy] = toPx(spec.start);
    s.polygon([sx, sy - 7, sx + 7, sy, sx, sy + 7, sx - 7, sy], PATH);
    s.text('start', sx + 9, sy + 14, { size: 11, color: PATH });
    spec.steps.forEach((st, i) => {
      const [x, y] = toPx(st.v);
      const pts: number[] = [];
      for (let k = 0; k < 20; k++) pts.push(x + 6 * Math.cos((k * Math.PI) / 10), y + 6 * Math.sin((k * Math.PI) / 10));
      s.polygon(pts, CHOSEN);
      s.text(`${i + 1}: ${st.label}`, x + 9, y + 4, { size: 12, bold: true, color: CHOSEN });
    });
    // key
    const ky = size - 12;
    s.fillRect(pad, ky - 9, 12, 9, REGION);
    s.text('reachable', pad + 16, ky, { size: 11 });
    s.strokeRect(pad + 90, ky - 9, 8, 8, ZONE, 1.2);
    s.text('zone axis', pad + 102, ky, { size: 11 });
    s.fillRect(pad + 172, ky - 6, 4, 4, OTHER);
    s.text('other reachable g', pad + 180, ky, { size: 11 });
    s.line(pad + 290, ky - 4, pad + 310, ky - 4, PATH, 2.2);
    s.text('tilt path, chosen g in order', pad + 315, ky, { size: 11 });
  });
}
