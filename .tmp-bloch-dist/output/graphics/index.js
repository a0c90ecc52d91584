export { rasterSurface } from './raster.js';
export { svgSurface } from './svg.js';
export { linePlot, clipPolyline, PALETTE } from './plot.js';
export { niceStep, niceRange, ticksIn, formatTick } from './ticks.js';
export { drawFigure, plotFigure, FIGURE_WIDTH, FIGURE_HEIGHT } from './figure.js';
