/**
 * The drawing interface shared by the raster (PNG) and vector (SVG)
 * surfaces, so that figure code draws once. Coordinates are pixels with the
 * origin at the top-left corner, x to the right and y down (SVG user units
 * are pixels too). Colours are 8-bit sRGB triples.
 */
export {};
