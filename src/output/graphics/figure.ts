/** One drawing, two files: run the same drawing code on a raster and an SVG surface. */
import { rasterSurface } from './raster.js';
import { svgSurface } from './svg.js';
import { linePlot, type PlotSpec } from './plot.js';
import type { RGB, Surface } from './types.js';

export interface Figure {
  readonly png: Uint8Array;
  readonly svg: string;
}

const WHITE: RGB = [255, 255, 255];

/** Draw with `draw` on both surfaces of width x height px; returns the PNG bytes and the SVG text. */
export function drawFigure(width: number, height: number, draw: (s: Surface) => void, background: RGB = WHITE): Figure {
  const r = rasterSurface(width, height, background);
  draw(r);
  const v = svgSurface(width, height, background);
  draw(v);
  return { png: r.toPng(), svg: v.toSvg() };
}

/** Default figure size, px. */
export const FIGURE_WIDTH = 820;
export const FIGURE_HEIGHT = 520;

/** A single line plot filling the figure, as PNG and SVG. */
export function plotFigure(spec: PlotSpec, width = FIGURE_WIDTH, height = FIGURE_HEIGHT): Figure {
  return drawFigure(width, height, (s) => {
    linePlot(s, { x: 0, y: 0, w: width, h: height }, spec);
  });
}
