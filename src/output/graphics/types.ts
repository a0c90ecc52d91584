/**
 * The drawing interface shared by the raster (PNG) and vector (SVG)
 * surfaces, so that figure code draws once. Coordinates are pixels with the
 * origin at the top-left corner, x to the right and y down (SVG user units
 * are pixels too). Colours are 8-bit sRGB triples.
 */

/** An sRGB colour, each channel 0..255. */
export type RGB = readonly [number, number, number];

/** An axis-aligned rectangle in pixels. */
export interface Box {
  readonly x: number;
  readonly y: number;
  readonly w: number;
  readonly h: number;
}

export interface TextOptions {
  /** font size in px (the em square) */
  readonly size: number;
  /** default black */
  readonly color?: RGB;
  /** where (x, y) sits along the text's advance: default 'start' */
  readonly anchor?: 'start' | 'middle' | 'end';
  /**
   * what y refers to: 'alphabetic' the baseline (default), 'middle' half the
   * cap height above the baseline, 'top' the font's ascender line
   */
  readonly baseline?: 'alphabetic' | 'middle' | 'top';
  readonly bold?: boolean;
  /** rotation about (x, y), degrees, counter-clockwise as seen on the page (90: reads bottom to top) */
  readonly rotate_deg?: number;
}

export interface Surface {
  readonly width: number;
  readonly height: number;
  fillRect(x: number, y: number, w: number, h: number, color: RGB): void;
  /** rectangle outline centred on the rectangle's border */
  strokeRect(x: number, y: number, w: number, h: number, color: RGB, lineWidth: number): void;
  /** straight line, butt ends; `dash` lists on/off lengths in px */
  line(x0: number, y0: number, x1: number, y1: number, color: RGB, lineWidth: number, dash?: readonly number[]): void;
  /** open polyline through x0,y0,x1,y1,...: butt ends, round joins; `dash` lists on/off lengths in px */
  polyline(points: readonly number[], color: RGB, lineWidth: number, dash?: readonly number[]): void;
  /** filled polygon x0,y0,x1,y1,... (non-zero winding) */
  polygon(points: readonly number[], color: RGB): void;
  /** line from (x0, y0) with a filled triangular head at (x1, y1) */
  arrow(x0: number, y0: number, x1: number, y1: number, color: RGB, lineWidth: number, headLength: number): void;
  /** grey image (w x h bytes, row by row) scaled to drawW x drawH px at (x, y), nearest neighbour */
  greyImage(pixels: Uint8Array, w: number, h: number, x: number, y: number, drawW: number, drawH: number): void;
  /** text drawn as glyph outlines of the bundled DejaVu Sans font */
  text(s: string, x: number, y: number, opts: TextOptions): void;
  /** advance width of s in px (kerning included) */
  measureText(s: string, size: number, bold?: boolean): number;
}
