/**
 * PNG (PNG specification, ISO/IEC 15948) to grey values through pngjs.
 * All bit depths (1, 2, 4, 8, 16) and colour types: grey and grey+alpha keep
 * their stored values; RGB, RGBA and palette images become grey by Rec. 601
 * luma (luminance.ts). Alpha is ignored. A tRNS chunk is dropped before
 * decoding, because pngjs would otherwise zero the pixels of the transparent
 * colour. The pixel size comes from a pHYs chunk in pixels per metre.
 */
import { inflateSync } from 'node:zlib';
import pngjs from 'pngjs';
import { InputError } from '../errors.js';
import { lumaRec601 } from './luminance.js';
import { type DecodedImage, MAX_PIXELS, MAX_SIDE } from './types.js';

const { PNG } = pngjs;

/** PNG signature (ISO/IEC 15948, 5.2). */
export const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a] as const;

export function isPng(bytes: Uint8Array): boolean {
  return bytes.length >= 8 && PNG_SIGNATURE.every((b, i) => bytes[i] === b);
}

interface ChunkScan {
  width: number;
  height: number;
  colourType: number;
  depth: number;
  interlace: number;
  /** Byte ranges of the IDAT chunks' data. */
  idat: Array<[number, number]>;
  pixel_nm?: number;
  /** The file without tRNS chunks (the same array when there is none). */
  cleaned: Uint8Array;
}

function chunkType(bytes: Uint8Array, at: number): string {
  return String.fromCharCode(bytes[at], bytes[at + 1], bytes[at + 2], bytes[at + 3]);
}

/** Walk the chunk list (ISO/IEC 15948, 5.3) for IHDR, pHYs and tRNS. */
function scanChunks(bytes: Uint8Array, name: string): ChunkScan {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const damaged = (why: string): InputError =>
    new InputError(`${name} is a damaged PNG file (${why}); save it again as PNG or TIFF.`);
  let at = 8;
  let ihdr: { width: number; height: number; depth: number; colourType: number; interlace: number } | undefined;
  const idat: Array<[number, number]> = [];
  let pixel_nm: number | undefined;
  const keep: Array<[number, number]> = [];
  let dropped = false;
  let sawEnd = false;
  while (at + 12 <= bytes.length) {
    const len = dv.getUint32(at);
    const type = chunkType(bytes, at + 4);
    const end = at + 12 + len;
    if (len > 0x7fffffff || end > bytes.length) throw damaged(`chunk ${type} runs past the end of the file`);
    if (type === 'IHDR') {
      if (len !== 13) throw damaged('bad IHDR chunk');
      ihdr = {
        width: dv.getUint32(at + 8),
        height: dv.getUint32(at + 12),
        depth: bytes[at + 16],
        colourType: bytes[at + 17],
        interlace: bytes[at + 20],
      };
    } else if (type === 'pHYs' && len === 9 && bytes[at + 16] === 1) {
      const ppmX = dv.getUint32(at + 8);
      const ppmY = dv.getUint32(at + 12);
      if (ppmX > 0 && ppmX === ppmY) pixel_nm = 1e9 / ppmX; // unit 1 = metre
    }
    if (type === 'IDAT') idat.push([at + 8, at + 8 + len]);
    if (type === 'tRNS') dropped = true;
    else keep.push([at, end]);
    at = end;
    if (type === 'IEND') {
      sawEnd = true;
      break;
    }
  }
  if (ihdr === undefined) throw damaged('no IHDR chunk');
  if (!sawEnd) throw damaged('it is truncated');
  let cleaned = bytes;
  if (dropped) {
    const total = 8 + keep.reduce((s, [a, b]) => s + (b - a), 0);
    cleaned = new Uint8Array(total);
    cleaned.set(bytes.subarray(0, 8), 0);
    let o = 8;
    for (const [a, b] of keep) {
      cleaned.set(bytes.subarray(a, b), o);
      o += b - a;
    }
  }
  return { ...ihdr, idat, cleaned, ...(pixel_nm !== undefined ? { pixel_nm } : {}) };
}

export function decodePng(bytes: Uint8Array, name: string): DecodedImage {
  const scan = scanChunks(bytes, name);
  const { width, height, colourType, depth } = scan;
  if (width === 0 || height === 0) throw new InputError(`${name} is a PNG file with no pixels; save the micrograph again.`);
  if (width * height > MAX_PIXELS || width > MAX_SIDE || height > MAX_SIDE) {
    throw new InputError(`${name} has ${width} x ${height} pixels, more than thinfoil reads (8192 x 8192 = ${MAX_PIXELS} pixels, at most ${MAX_SIDE} on a side); crop or bin it first.`);
  }
  if (scan.interlace !== 0) {
    // pngjs inflates interlaced images without a size cap: check the stream's size first.
    // Adam7 (ISO/IEC 15948, 8.2) stores every pixel once plus one filter byte per row of each pass.
    const channels = [1, 0, 3, 1, 2, 0, 4][colourType] ?? 4;
    const bound = height * (Math.ceil((width * channels * depth) / 8) + 7) + 7 * 16;
    const stream = Buffer.concat(scan.idat.map(([a, b]) => bytes.subarray(a, b)));
    try {
      inflateSync(stream, { maxOutputLength: bound });
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code;
      const why = code === 'ERR_BUFFER_TOO_LARGE' ? 'its pixel data decompresses to more than its size allows' : 'its pixel data cannot be decompressed';
      throw new InputError(`${name} is a damaged PNG file (${why}); save it again as PNG or TIFF.`);
    }
  }
  let png: { data: Uint8Array | Uint16Array };
  try {
    const buf = Buffer.from(scan.cleaned.buffer, scan.cleaned.byteOffset, scan.cleaned.byteLength);
    png = PNG.sync.read(buf, { skipRescale: true }) as unknown as { data: Uint8Array | Uint16Array };
  } catch (err) {
    const why = err instanceof Error ? err.message.replace(/[.;]+$/, '') : String(err);
    throw new InputError(`${name} is a damaged PNG file (${why}); save it again as PNG or TIFF.`);
  }
  const rgba = png.data;
  const n = width * height;
  if (rgba.length < 4 * n) throw new InputError(`${name} is a damaged PNG file (too little pixel data); save it again.`);
  const data = new Float32Array(n);
  // colour type bit 2 = colour, value 3 = palette (ISO/IEC 15948, table 11.1)
  const colour = colourType === 2 || colourType === 3 || colourType === 6;
  if (colour) {
    for (let i = 0; i < n; i++) data[i] = lumaRec601(rgba[4 * i], rgba[4 * i + 1], rgba[4 * i + 2]);
  } else {
    for (let i = 0; i < n; i++) data[i] = rgba[4 * i];
  }
  const bitDepth = colourType === 3 ? 8 : depth;
  return { width, height, data, bitDepth, kind: 'png', ...(scan.pixel_nm !== undefined ? { pixel_nm: scan.pixel_nm } : {}) };
}
