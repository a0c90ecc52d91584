/**
 * Marks drawn over an image in a figure: a label on a white plate, the g
 * arrow and a scale bar. One drawing for the comparison figure of `identify`
 * and the figures of `render`; `k` scales every length (1: the render figures,
 * about 1.3: the 2000 px comparison figure).
 */
import type { RGB, Surface } from './graphics/types.js';

const INK: RGB = [28, 28, 32];
const WHITE: RGB = [255, 255, 255];
const BLACK: RGB = [0, 0, 0];

export interface Box {
  readonly x: number;
  readonly y: number;
  readonly w: number;
  readonly h: number;
}

/** Text on a white plate, for legibility over an image. */
export function plateText(s: Surface, text: string, x: number, y: number, size: number, opts: { bold?: boolean; color?: RGB } = {}): void {
  const w = s.measureText(text, size, opts.bold ?? false);
  const pad = Math.max(4, size * 0.22);
  s.fillRect(x - pad, y - size * 0.95, w + 2 * pad, size * 1.25, WHITE);
  s.text(text, x, y, { size, bold: opts.bold ?? false, color: opts.color ?? INK });
}

/** g arrow centred at (cx, cy), screen angle counter-clockwise from +x (y down on the page); returns tail and head. */
export function gArrow(s: Surface, angle_deg: number, cx: number, cy: number, len: number, k = 1): { x0: number; y0: number; x1: number; y1: number } {
  const a = (angle_deg * Math.PI) / 180;
  const dx = (Math.cos(a) * len) / 2;
  const dy = (-Math.sin(a) * len) / 2;
  s.arrow(cx - dx, cy - dy, cx + dx, cy + dy, BLACK, 6 * k, 16 * k);
  s.arrow(cx - dx, cy - dy, cx + dx, cy + dy, WHITE, 3 * k, 13 * k);
  const lx = cx + dx * 1.5;
  const ly = cy + dy * 1.5;
  s.text('g', lx + 1, ly + 1, { size: 22 * k, bold: true, color: BLACK, anchor: 'middle', baseline: 'middle' });
  s.text('g', lx, ly, { size: 22 * k, bold: true, color: WHITE, anchor: 'middle', baseline: 'middle' });
  return { x0: cx - dx, y0: cy - dy, x1: cx + dx, y1: cy + dy };
}

/** Largest 1, 2 or 5 times a power of ten not above x. */
export function niceLength(x: number): number {
  if (!(x > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [5, 2, 1]) if (m * p <= x) return Number((m * p).toPrecision(6));
  return p;
}

/**
 * Scale bar of a 1-2-5 length near `fraction` of the field width, bottom right of the box; its length in
 * figure px is length_nm / field_nm times the box width. Returns its ends, the row through its middle and its length.
 */
export function scaleBar(s: Surface, field_nm: number, box: Box, fraction: number, k = 1): { x0: number; x1: number; y: number; length_nm: number } {
  const length_nm = niceLength(field_nm * fraction);
  const len = (length_nm / field_nm) * box.w;
  const x1 = box.x + box.w - 12 * k;
  const x0 = x1 - len;
  const y = box.y + box.h - 14 * k;
  s.fillRect(x0 - 2 * k, y - 7 * k, len + 4 * k, 10 * k, BLACK);
  s.fillRect(x0, y - 5 * k, len, 6 * k, WHITE);
  const label = `${length_nm} nm`;
  const size = 16 * k;
  const tw = s.measureText(label, size, true);
  s.fillRect(x0 + len / 2 - tw / 2 - 4 * k, y - 12 * k - size, tw + 8 * k, size + 5 * k, WHITE);
  s.text(label, x0 + len / 2, y - 11 * k, { size, bold: true, color: INK, anchor: 'middle' });
  return { x0, x1, y: y - 2 * k, length_nm };
}
