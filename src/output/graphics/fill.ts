/**
 * Anti-aliased polygon filling on an RGB pixel buffer: a scanline filler
 * with the non-zero winding rule. Every pixel row is sampled by
 * SUBSCANLINES horizontal lines at y = row + (k + 1/2)/SUBSCANLINES; on each
 * the inside spans are found from the edge crossings and their exact
 * horizontal overlap with every pixel is accumulated, so the coverage is
 * exact along x and sampled along y. The colour is blended over the buffer
 * with the coverage as opacity (clamped to 1).
 */
import type { RGB } from './types.js';

/** Sub-scanlines per pixel row. */
export const SUBSCANLINES = 16;

/** Pixel bounds [x0, x1) x [y0, y1), integers. */
export interface PixelClip {
  readonly x0: number;
  readonly y0: number;
  readonly x1: number;
  readonly y1: number;
}

/**
 * Visit the coverage (0..1, not clamped) of the union of the closed
 * contours (non-zero winding), row by row: visit(row, x0, x1, cov) with
 * cov[x] for x in [x0, x1).
 */
export function scanCoverage(
  contours: readonly (readonly number[])[],
  clip: PixelClip,
  visit: (row: number, x0: number, x1: number, cov: Float64Array) => void,
): void {
  let nEdges = 0;
  for (const c of contours) nEdges += c.length >> 1;
  const eYmin = new Float64Array(nEdges);
  const eYmax = new Float64Array(nEdges);
  const eX = new Float64Array(nEdges);
  const eSlope = new Float64Array(nEdges);
  const eDir = new Int8Array(nEdges);
  let m = 0;
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (const c of contours) {
    const n = c.length >> 1;
    if (n < 2) continue;
    for (let i = 0; i < n; i++) {
      const x0 = c[2 * i];
      const y0 = c[2 * i + 1];
      const j = i + 1 === n ? 0 : i + 1;
      const x1 = c[2 * j];
      const y1 = c[2 * j + 1];
      if (!(Number.isFinite(x0) && Number.isFinite(y0))) throw new RangeError('fill: a polygon has a non-finite coordinate');
      if (x0 < minX) minX = x0;
      if (x0 > maxX) maxX = x0;
      if (y0 < minY) minY = y0;
      if (y0 > maxY) maxY = y0;
      if (y0 === y1) continue;
      if (y0 < y1) {
        eYmin[m] = y0;
        eYmax[m] = y1;
        eX[m] = x0;
        eDir[m] = 1;
      } else {
        eYmin[m] = y1;
        eYmax[m] = y0;
        eX[m] = x1;
        eDir[m] = -1;
      }
      eSlope[m] = (x1 - x0) / (y1 - y0);
      m++;
    }
  }
  if (m === 0) return;
  const cx0 = Math.max(clip.x0, Math.floor(minX));
  const cx1 = Math.min(clip.x1, Math.ceil(maxX));
  const r0 = Math.max(clip.y0, Math.floor(minY));
  const r1 = Math.min(clip.y1, Math.ceil(maxY));
  if (cx1 <= cx0 || r1 <= r0) return;

  // edges in order of the first sample line they meet (counting sort): line K (counted from
  // row r0) lies at y = r0 + (K + 1/2) / SUBSCANLINES, so an edge starting at ymin meets line
  // ceil((ymin - r0) SUBSCANLINES - 1/2) first
  const nLines = (r1 - r0) * SUBSCANLINES;
  const key = new Int32Array(m);
  const count = new Int32Array(nLines + 3);
  for (let e = 0; e < m; e++) {
    const kk = Math.ceil((eYmin[e] - r0) * SUBSCANLINES - 0.5);
    key[e] = kk < 0 ? 0 : kk > nLines ? nLines + 1 : kk;
    count[key[e] + 1]++;
  }
  for (let i = 1; i < count.length; i++) count[i] += count[i - 1];
  const order = new Int32Array(m);
  for (let e = 0; e < m; e++) order[count[key[e]]++] = e;
  // active edges, kept in order of their crossing x from one sub-scanline to the next, so
  // that re-sorting (insertion sort) is nearly linear
  const act = new Int32Array(m);
  const ax = new Float64Array(m);
  let nAct = 0;
  let next = 0;
  const width = cx1 - cx0;
  const cov = new Float64Array(width + 2); // index x - cx0
  const diff = new Float64Array(width + 2);
  const wt = 1 / SUBSCANLINES;
  const lo = cx0;
  const hi = cx1;

  const addSpan = (a: number, b: number): void => {
    if (a < lo) a = lo;
    if (b > hi) b = hi;
    if (!(b > a)) return;
    const ia = Math.floor(a);
    const ib = Math.floor(b);
    if (ia === ib) {
      cov[ia - lo] += (b - a) * wt;
      return;
    }
    cov[ia - lo] += (ia + 1 - a) * wt;
    diff[ia + 1 - lo] += wt;
    diff[ib - lo] -= wt;
    if (b > ib) cov[ib - lo] += (b - ib) * wt;
  };

  for (let row = r0; row < r1; row++) {
    cov.fill(0);
    diff.fill(0);
    let any = false;
    for (let k = 0; k < SUBSCANLINES; k++) {
      const y = row + (k + 0.5) * wt;
      const line = (row - r0) * SUBSCANLINES + k;
      // drop finished edges (keeping the order), update x of the others
      let kept = 0;
      for (let a = 0; a < nAct; a++) {
        const e = act[a];
        if (eYmax[e] <= y) continue;
        act[kept] = e;
        ax[kept] = eX[e] + (y - eYmin[e]) * eSlope[e];
        kept++;
      }
      nAct = kept;
      while (next < m && key[order[next]] <= line) {
        const e = order[next++];
        if (eYmax[e] <= y) continue;
        act[nAct] = e;
        ax[nAct] = eX[e] + (y - eYmin[e]) * eSlope[e];
        nAct++;
      }
      // insertion sort by x (nearly sorted already)
      for (let i = 1; i < nAct; i++) {
        const x = ax[i];
        if (ax[i - 1] <= x) continue;
        const e = act[i];
        let p = i;
        while (p > 0 && ax[p - 1] > x) {
          ax[p] = ax[p - 1];
          act[p] = act[p - 1];
          p--;
        }
        ax[p] = x;
        act[p] = e;
      }
      let w = 0;
      let start = 0;
      for (let i = 0; i < nAct; i++) {
        const before = w;
        w += eDir[act[i]];
        if (before === 0 && w !== 0) start = ax[i];
        else if (before !== 0 && w === 0) {
          addSpan(start, ax[i]);
          any = true;
        }
      }
    }
    if (!any) {
      if (next >= m && nAct === 0) break;
      continue;
    }
    let run = 0;
    for (let i = 0; i < width; i++) {
      run += diff[i];
      cov[i] += run;
    }
    visit(row, cx0, cx1, cov);
  }
}

/** Fill the contours (non-zero winding) with colour over an RGB buffer of width x height pixels. */
export function fillContours(
  rgb: Uint8Array,
  width: number,
  height: number,
  contours: readonly (readonly number[])[],
  color: RGB,
  clip: PixelClip = { x0: 0, y0: 0, x1: width, y1: height },
): void {
  const c: PixelClip = {
    x0: Math.max(0, clip.x0),
    y0: Math.max(0, clip.y0),
    x1: Math.min(width, clip.x1),
    y1: Math.min(height, clip.y1),
  };
  const [r, g, b] = color;
  scanCoverage(contours, c, (row, x0, x1, cov) => {
    let p = 3 * (row * width + x0);
    for (let x = x0; x < x1; x++, p += 3) {
      const a = cov[x - x0];
      if (a <= 1e-9) continue;
      if (a >= 1 - 1e-9) {
        rgb[p] = r;
        rgb[p + 1] = g;
        rgb[p + 2] = b;
        continue;
      }
      rgb[p] = Math.round(rgb[p] + (r - rgb[p]) * a);
      rgb[p + 1] = Math.round(rgb[p + 1] + (g - rgb[p + 1]) * a);
      rgb[p + 2] = Math.round(rgb[p + 2] + (b - rgb[p + 2]) * a);
    }
  });
}
