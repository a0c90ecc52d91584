/**
 * PNG encoding (PNG specification, ISO/IEC 15948) through pngjs: 8-bit grey
 * (colour type 0) and 8-bit RGB (colour type 2), rows top to bottom, no
 * alpha. The contrast stretch that turns a float image into grey levels lives
 * in stretch.ts and is re-exported here.
 */
import pngjs from 'pngjs';
export { autoStretch, stretchToBytes, DEFAULT_CLIP_FRACTION } from './stretch.js';
const { PNG } = pngjs;
/** PNG colour types (ISO/IEC 15948, table 11.1). */
const COLOUR_GREY = 0;
const COLOUR_RGB = 2;
function checkSize(what, length, width, height, channels) {
    if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
        throw new RangeError(`${what}: width and height must be positive integers, got ${width} x ${height}.`);
    }
    // PNG limits both dimensions to 2^31 - 1 (ISO/IEC 15948, 11.2.2)
    if (width > 0x7fffffff || height > 0x7fffffff) {
        throw new RangeError(`${what}: ${width} x ${height} exceeds the PNG size limit.`);
    }
    if (length !== width * height * channels) {
        throw new RangeError(`${what}: expected ${width * height * channels} bytes for ${width} x ${height}, got ${length}.`);
    }
}
function encode(data, width, height, colourType) {
    const buf = Buffer.from(data.buffer, data.byteOffset, data.byteLength);
    const out = PNG.sync.write({ width, height, data: buf }, {
        colorType: colourType,
        inputColorType: colourType,
        inputHasAlpha: false,
        bitDepth: 8,
    });
    return new Uint8Array(out.buffer, out.byteOffset, out.byteLength);
}
/** 8-bit greyscale PNG; `pixels` has width*height bytes, row by row. */
export function encodeGreyPng(pixels, width, height) {
    checkSize('encodeGreyPng', pixels.length, width, height, 1);
    return encode(pixels, width, height, COLOUR_GREY);
}
/** 8-bit RGB PNG; `rgb` has 3*width*height bytes (R, G, B per pixel), row by row. */
export function encodeRgbPng(rgb, width, height) {
    checkSize('encodeRgbPng', rgb.length, width, height, 3);
    return encode(rgb, width, height, COLOUR_RGB);
}
