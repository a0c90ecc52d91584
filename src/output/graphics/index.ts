/** The drawing library: one Surface interface, a raster (PNG) and a vector (SVG) implementation, and line plots. */
export type { RGB, Box, Surface, TextOptions } from './types.js';
export { rasterSurface, type RasterSurface } from './raster.js';
export { svgSurface, type SvgSurface } from './svg.js';
export { linePlot, clipPolyline, PALETTE, type PlotSpec, type PlotSeries, type PlotMarker, type PlotLayout } from './plot.js';
export { niceStep, niceRange, ticksIn, formatTick } from './ticks.js';
export { drawFigure, plotFigure, FIGURE_WIDTH, FIGURE_HEIGHT, type Figure } from './figure.js';
