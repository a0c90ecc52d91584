/**
 * Stroke outlines as polygons, shared by the raster surface (which fills
 * them) and by tests: a line of width w is a quad per segment with butt ends,
 * polylines get round joins (a disc of diameter w at every inner vertex, the
 * same shape as SVG's stroke-linejoin="round"). All polygons are returned
 * counter-clockwise on the page so that their union fills once under the
 * non-zero winding rule.
 */

/** Most segments of a disc polygon. */
const DISC_SEGMENTS = 24;
/** Largest distance between a disc polygon's edges and its circle, px. */
const DISC_TOLERANCE_PX = 0.02;

/** Segments of a disc of radius r whose edges stay within DISC_TOLERANCE_PX of the circle (8..24). */
export function discSegments(r: number): number {
  if (!(r > DISC_TOLERANCE_PX)) return 8;
  const n = Math.ceil(Math.PI / Math.acos(1 - DISC_TOLERANCE_PX / r));
  return Math.max(8, Math.min(DISC_SEGMENTS, n));
}

/** Signed area (shoelace), positive for counter-clockwise on the page (y down). */
export function signedArea(poly: readonly number[]): number {
  let a = 0;
  const n = poly.length >> 1;
  for (let i = 0; i < n; i++) {
    const j = i + 1 === n ? 0 : i + 1;
    a += poly[2 * j] * poly[2 * i + 1] - poly[2 * i] * poly[2 * j + 1];
  }
  return a / 2;
}

/** The polygon with counter-clockwise (page) orientation. */
export function counterClockwise(poly: number[]): number[] {
  if (signedArea(poly) >= 0) return poly;
  const out: number[] = [];
  for (let i = poly.length - 2; i >= 0; i -= 2) out.push(poly[i], poly[i + 1]);
  return out;
}

/** A regular polygon approximating the circle of radius r about (cx, cy). */
export function discPolygon(cx: number, cy: number, r: number, segments = discSegments(r)): number[] {
  const out: number[] = [];
  for (let i = 0; i < segments; i++) {
    const a = (-2 * Math.PI * i) / segments; // counter-clockwise on the page
    out.push(cx + r * Math.cos(a), cy + r * Math.sin(a));
  }
  return out;
}

/** The quad covering the segment (x0, y0)-(x1, y1) with width w, or null for a zero-length segment. */
export function segmentQuad(x0: number, y0: number, x1: number, y1: number, w: number): number[] | null {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const len = Math.hypot(dx, dy);
  if (!(len > 0)) return null;
  const nx = (-dy / len) * (w / 2);
  const ny = (dx / len) * (w / 2);
  return counterClockwise([x0 + nx, y0 + ny, x1 + nx, y1 + ny, x1 - nx, y1 - ny, x0 - nx, y0 - ny]);
}

/**
 * The round join at vertex (px, py) between a segment along a and one along
 * b: the wedge between the two quads' outer corners bounded by the arc of
 * radius r (null when the direction does not change).
 */
export function roundJoin(px: number, py: number, ax: number, ay: number, bx: number, by: number, r: number): number[] | null {
  const la = Math.hypot(ax, ay);
  const lb = Math.hypot(bx, by);
  if (!(la > 0 && lb > 0)) return null;
  const cross = ax * by - ay * bx;
  const dot = ax * bx + ay * by;
  const delta = Math.atan2(cross, dot); // signed turn
  if (delta === 0) return null;
  // outer side: left of travel (-perp) for cross > 0, right (+perp) otherwise; perp(v) = (-vy, vx)
  const side = cross > 0 ? -1 : 1;
  const ox = (side * -ay * r) / la;
  const oy = (side * ax * r) / la;
  const phi = Math.atan2(oy, ox);
  const step = 2 * Math.acos(Math.max(-1, 1 - DISC_TOLERANCE_PX / r));
  const n = Math.max(1, Math.ceil(Math.abs(delta) / (step > 0 ? step : Math.PI / 12)));
  const out = [px, py];
  for (let k = 0; k <= n; k++) {
    const f = phi + (delta * k) / n;
    out.push(px + r * Math.cos(f), py + r * Math.sin(f));
  }
  return counterClockwise(out);
}

/** Polygons of a polyline stroke of width w (butt ends, round joins). */
export function polylineStroke(pointsIn: readonly number[], w: number): number[][] {
  // repeated points carry no direction: drop them so every join sees two real segments
  const points: number[] = [];
  for (let i = 0; i + 1 < pointsIn.length; i += 2) {
    const k = points.length;
    if (k >= 2 && points[k - 2] === pointsIn[i] && points[k - 1] === pointsIn[i + 1]) continue;
    points.push(pointsIn[i], pointsIn[i + 1]);
  }
  const out: number[][] = [];
  const n = points.length >> 1;
  for (let i = 0; i + 1 < n; i++) {
    const q = segmentQuad(points[2 * i], points[2 * i + 1], points[2 * i + 2], points[2 * i + 3], w);
    if (q) out.push(q);
  }
  const r = w / 2;
  for (let i = 1; i + 1 < n; i++) {
    const j = roundJoin(
      points[2 * i],
      points[2 * i + 1],
      points[2 * i] - points[2 * i - 2],
      points[2 * i + 1] - points[2 * i - 1],
      points[2 * i + 2] - points[2 * i],
      points[2 * i + 3] - points[2 * i + 1],
      r,
    );
    if (j) out.push(j);
  }
  return out;
}

/**
 * Split a polyline into the "on" pieces of a dash pattern (on, off, on, ...
 * lengths in px, starting with "on" at the first point, as SVG's
 * stroke-dasharray with offset 0).
 */
export function dashPolyline(points: readonly number[], dash: readonly number[]): number[][] {
  const pattern = dash.length % 2 === 1 ? [...dash, ...dash] : [...dash];
  const total = pattern.reduce((a, b) => a + b, 0);
  if (pattern.length === 0 || !(total > 0) || pattern.some((d) => !(d >= 0) || !Number.isFinite(d))) return [Array.from(points)];
  const out: number[][] = [];
  let idx = 0;
  let left = pattern[0];
  let on = true;
  let cur: number[] = [points[0], points[1]];
  const n = points.length >> 1;
  for (let i = 0; i + 1 < n; i++) {
    let x = points[2 * i];
    let y = points[2 * i + 1];
    const x1 = points[2 * i + 2];
    const y1 = points[2 * i + 3];
    let seg = Math.hypot(x1 - x, y1 - y);
    while (seg > left) {
      const f = left / seg;
      x += (x1 - x) * f;
      y += (y1 - y) * f;
      seg -= left;
      if (on) {
        cur.push(x, y);
        if (cur.length >= 4) out.push(cur);
        cur = [];
      } else {
        cur = [x, y];
      }
      on = !on;
      idx = (idx + 1) % pattern.length;
      left = pattern[idx];
    }
    left -= seg;
    if (on) cur.push(x1, y1);
  }
  if (on && cur.length >= 4) out.push(cur);
  return out;
}

/** Shaft end point and head triangle of an arrow from (x0, y0) to the tip (x1, y1). */
export function arrowGeometry(
  x0: number,
  y0: number,
  x1: number,
  y1: number,
  headLength: number,
): { shaftEnd: [number, number]; head: number[] } | null {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const len = Math.hypot(dx, dy);
  if (!(len > 0)) return null;
  const ux = dx / len;
  const uy = dy / len;
  const hl = Math.min(headLength, len);
  const bx = x1 - ux * hl;
  const by = y1 - uy * hl;
  const hw = 0.4 * hl; // half width of the head
  const head = counterClockwise([x1, y1, bx - uy * hw, by + ux * hw, bx + uy * hw, by - ux * hw]);
  // the shaft stops inside the head so no gap shows
  return { shaftEnd: [x1 - ux * hl * 0.5, y1 - uy * hl * 0.5], head };
}

/** The ring of a rectangle outline of line width w centred on the border (outer counter-clockwise, inner clockwise). */
export function rectRing(x: number, y: number, w: number, h: number, lw: number): number[][] {
  const o = lw / 2;
  const outer = counterClockwise([x - o, y - o, x + w + o, y - o, x + w + o, y + h + o, x - o, y + h + o]);
  if (w <= lw || h <= lw) return [outer];
  const innerCcw = counterClockwise([x + o, y + o, x + w - o, y + o, x + w - o, y + h - o, x + o, y + h - o]);
  const inner: number[] = [];
  for (let i = innerCcw.length - 2; i >= 0; i -= 2) inner.push(innerCcw[i], innerCcw[i + 1]);
  return [outer, inner];
}
