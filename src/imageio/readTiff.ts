/**
 * TIFF (TIFF 6.0 specification, Adobe 1992) to grey values. The first page
 * only. The directory is read by tiffDirectory.ts; the strips or tiles are
 * decompressed by tiffCodecs.ts (uncompressed, LZW, Deflate, PackBits), each
 * checked to decode to exactly the bytes the geometry asks for. This module
 * then turns the bytes into samples in the file's byte order, undoes
 * horizontal differencing (Predictor 2, TIFF 6.0 section 14) itself, and
 * makes one grey value per pixel:
 *   BlackIsZero: the first sample as stored (extra samples such as alpha are ignored);
 *   WhiteIsZero (unsigned only): 2^bits - 1 - stored value, so bright stays bright;
 *   RGB: Rec. 601 luma of the first three samples (luminance.ts);
 *   palette: Rec. 601 luma of the 16-bit ColorMap entries.
 * Samples: 8, 16 or 32-bit unsigned or signed integers, 32-bit IEEE float.
 * 32-bit integers above 2^24 in magnitude are rounded to the nearest float.
 */
import { InputError } from '../errors.js';
import { lumaRec601 } from './luminance.js';
import { readFirstDirectory, type TiffDirectory } from './tiffDirectory.js';
import { type DecodedImage, MAX_PIXELS, MAX_RAW_BYTES, MAX_SIDE } from './types.js';
import { type BlockResult, inflateDecode, lzwDecode, packBitsDecode } from './tiffCodecs.js';

/** Largest tile side accepted (a tile is decoded into one buffer). */
const MAX_TILE_SIDE = 8192;


/** Field tags (TIFF 6.0, sections 8, 14, 15, 19). */
const T = {
  width: 256,
  height: 257,
  bitsPerSample: 258,
  compression: 259,
  photometric: 262,
  stripOffsets: 273,
  orientation: 274,
  samplesPerPixel: 277,
  rowsPerStrip: 278,
  stripByteCounts: 279,
  xResolution: 282,
  yResolution: 283,
  planar: 284,
  resolutionUnit: 296,
  imageDescription: 270,
  predictor: 317,
  extraSamples: 338,
  colorMap: 320,
  tileWidth: 322,
  tileLength: 323,
  tileOffsets: 324,
  tileByteCounts: 325,
  sampleFormat: 339,
} as const;

/** Compression schemes this reader decodes (tiffCodecs.ts); 32946 is the older code for Deflate. */
const READABLE_COMPRESSION = new Set([1, 5, 8, 32946, 32773]);
const COMPRESSION_NAME: Readonly<Record<number, string>> = {
  2: 'CCITT modified Huffman',
  3: 'CCITT Group 3',
  4: 'CCITT Group 4',
  6: 'old-style JPEG',
  7: 'JPEG',
  32809: 'ThunderScan',
  34712: 'JPEG 2000',
  34925: 'LZMA',
  50000: 'Zstandard',
  50001: 'WebP',
};
const PHOTOMETRIC_NAME: Readonly<Record<number, string>> = {
  4: 'transparency mask',
  5: 'CMYK',
  6: 'YCbCr',
  8: 'CIE L*a*b*',
  9: 'ICC L*a*b*',
  10: 'ITU L*a*b*',
  32803: 'colour filter array (camera raw)',
  32844: 'LogL',
  32845: 'LogLuv',
  34892: 'linear raw',
};

function cannot(name: string, what: string, fix: string): InputError {
  return new InputError(`${name} ${what}, which thinfoil cannot read; ${fix}.`);
}

const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Undo horizontal differencing in place, row by row, restarting every `segment` pixels (tile width). */
function undoPredictor(s: Uint8Array | Uint16Array | Uint32Array, width: number, height: number, spp: number, segment: number): void {
  for (let y = 0; y < height; y++) {
    const row = y * width * spp;
    for (let x0 = 0; x0 < width; x0 += segment) {
      const x1 = Math.min(width, x0 + segment);
      for (let k = row + (x0 + 1) * spp; k < row + x1 * spp; k++) s[k] = s[k] + s[k - spp]; // wraps modulo 2^bits
    }
  }
}

/**
 * Samples in host byte order as unsigned integers of the file's width. `raw`
 * is owned by the caller and may be reused; `le16`/`le32` give the byte order
 * of 16- and 32-bit samples in `raw`.
 */
function samplesFrom(raw: Uint8Array, count: number, bps: number, le16: boolean, le32: boolean): Uint8Array | Uint16Array | Uint32Array {
  if (bps === 8) return raw.subarray(0, count);
  const le = bps === 16 ? le16 : le32;
  const aligned = raw.byteOffset % (bps / 8) === 0;
  if (LITTLE_ENDIAN_HOST === le && aligned) {
    return bps === 16 ? new Uint16Array(raw.buffer, raw.byteOffset, count) : new Uint32Array(raw.buffer, raw.byteOffset, count);
  }
  const dv = new DataView(raw.buffer, raw.byteOffset, raw.byteLength);
  if (bps === 16) {
    const out = new Uint16Array(count);
    for (let i = 0; i < count; i++) out[i] = dv.getUint16(2 * i, le);
    return out;
  }
  const out = new Uint32Array(count);
  for (let i = 0; i < count; i++) out[i] = dv.getUint32(4 * i, le);
  return out;
}

interface Layout {
  width: number;
  height: number;
  spp: number;
  sampleBytes: number;
  compression: number;
  tiled: boolean;
  tileWidth: number;
  tileLength: number;
  rowsPerStrip: number;
  offsets: number[];
  counts: number[];
  /** Bytes block i must decode to. */
  needBytes: (i: number) => number;
  /** Bytes of a full strip or tile. */
  fullBlockBytes: number;
}

const CODECS: Readonly<Record<number, (src: Uint8Array, out: Uint8Array) => BlockResult>> = {
  5: lzwDecode,
  8: inflateDecode,
  32773: packBitsDecode,
};

/**
 * Decompress every strip or tile into one buffer of the image's rows (file
 * byte order). Each block must decode to exactly the bytes its geometry
 * asks for (a strip may also hold its full RowsPerStrip rows); anything
 * else means the layout fields do not describe the data and is refused.
 */
function decodeBlocks(bytes: Uint8Array, L: Layout, damaged: (why: string) => InputError): Uint8Array {
  const rowBytes = L.width * L.spp * L.sampleBytes;
  const raw = new Uint8Array(L.height * rowBytes);
  const block = new Uint8Array(L.fullBlockBytes); // reused for every block
  const what = L.tiled ? 'tile' : 'strip';
  const across = Math.ceil(L.width / L.tileWidth);
  const n = L.tiled ? across * Math.ceil(L.height / L.tileLength) : Math.ceil(L.height / L.rowsPerStrip);
  for (let i = 0; i < n; i++) {
    const need = L.needBytes(i);
    let got: number;
    if (L.compression === 1) {
      block.set(bytes.subarray(L.offsets[i], L.offsets[i] + need), 0);
      got = need;
    } else {
      const src = bytes.subarray(L.offsets[i], L.offsets[i] + L.counts[i]);
      const r = CODECS[L.compression](src, block);
      if (r.error !== undefined) throw damaged(`${what} ${i}: ${r.error}`);
      if (r.overflow) {
        throw damaged(`${what} ${i} decompresses to more than the ${L.fullBlockBytes} bytes its size and SamplesPerPixel/BitsPerSample allow`);
      }
      if (r.written < need) throw damaged(`${what} ${i} decompresses to ${r.written} bytes where ${need} are needed`);
      got = r.written;
    }
    if (!L.tiled) {
      raw.set(block.subarray(0, Math.min(got, raw.length - i * L.rowsPerStrip * rowBytes)), i * L.rowsPerStrip * rowBytes);
      continue;
    }
    // copy the part of the tile that lies inside the image (TIFF 6.0, section 15)
    const x0 = (i % across) * L.tileWidth;
    const y0 = Math.floor(i / across) * L.tileLength;
    const tileRow = L.tileWidth * L.spp * L.sampleBytes;
    const copy = (Math.min(L.width, x0 + L.tileWidth) - x0) * L.spp * L.sampleBytes;
    const rows = Math.min(L.height, y0 + L.tileLength) - y0;
    for (let r = 0; r < rows; r++) {
      const from = r * tileRow;
      raw.set(block.subarray(from, from + copy), (y0 + r) * rowBytes + x0 * L.spp * L.sampleBytes);
    }
  }
  return raw;
}

/** The same bits read as the file's sample format. */
function typedView(s: Uint8Array | Uint16Array | Uint32Array, format: number): ArrayLike<number> {
  if (format === 1) return s;
  if (format === 3) return new Float32Array(s.buffer, s.byteOffset, s.length);
  if (s instanceof Uint8Array) return new Int8Array(s.buffer, s.byteOffset, s.length);
  if (s instanceof Uint16Array) return new Int16Array(s.buffer, s.byteOffset, s.length);
  return new Int32Array(s.buffer, s.byteOffset, s.length);
}

function pixelSize_nm(dir: TiffDirectory): number | undefined {
  const x = dir.numbers.get(T.xResolution)?.[0];
  if (x === undefined || !(x > 0) || !Number.isFinite(x)) return undefined;
  const y = dir.numbers.get(T.yResolution)?.[0] ?? x;
  if (Math.abs(x - y) > 1e-9 * x) return undefined; // non-square pixels: no single size
  const unit = dir.numbers.get(T.resolutionUnit)?.[0] ?? 2; // default: inch (TIFF 6.0, section 8)
  if (unit === 2) return 2.54e7 / x;
  if (unit === 3) return 1e7 / x;
  // no absolute unit: the ImageJ-family description may name one ("unit=nm"; see output/tiff.ts)
  const perUnit = descriptionUnit_nm(dir.texts.get(T.imageDescription));
  return perUnit === undefined ? undefined : perUnit / x;
}

/** nm per unit named by an ImageJ-family description ("ImageJ=..." with a line "unit=nm", "um", "micron", ...), else undefined. */
export function descriptionUnit_nm(text: string | undefined): number | undefined {
  if (text === undefined || !text.startsWith('ImageJ=')) return undefined;
  const m = /(?:^|\n)unit=([^\n]*)/.exec(text);
  if (m === null) return undefined;
  const u = m[1].trim().replace(/\\u00B5/g, '\u00b5');
  const table: Record<string, number> = { nm: 1, nanometer: 1, nanometre: 1, um: 1e3, '\u00b5m': 1e3, micron: 1e3, microns: 1e3, micrometer: 1e3, micrometre: 1e3, mm: 1e6, A: 0.1, '\u00c5': 0.1, angstrom: 0.1, pm: 1e-3 };
  return table[u];
}

export function decodeTiff(bytes: Uint8Array, name: string): DecodedImage {
  const dir = readFirstDirectory(bytes, name);
  const damaged = (why: string): InputError =>
    new InputError(`${name} is a damaged or truncated TIFF file (${why}); save it again.`);
  const list = (tag: number): number[] | undefined => dir.numbers.get(tag);
  const one = (tag: number, fallback?: number): number => {
    const v = list(tag)?.[0] ?? fallback;
    if (v === undefined) throw damaged(`field ${tag} is missing`);
    return v;
  };

  const width = one(T.width);
  const height = one(T.height);
  if (width === 0 || height === 0) throw new InputError(`${name} is a TIFF file with no pixels; save the micrograph again.`);
  if (width * height > MAX_PIXELS || width > MAX_SIDE || height > MAX_SIDE) {
    throw new InputError(`${name} has ${width} x ${height} pixels, more than thinfoil reads (8192 x 8192 = ${MAX_PIXELS} pixels, at most ${MAX_SIDE} on a side); crop or bin it first.`);
  }
  const spp = one(T.samplesPerPixel, 1);
  if (spp < 1) throw damaged('SamplesPerPixel is 0');
  if (spp > 16) throw damaged(`SamplesPerPixel is ${spp}`);
  const bpsList = list(T.bitsPerSample) ?? [1];
  const bps = bpsList[0];
  if (bpsList.length !== 1 && bpsList.length !== spp) {
    throw damaged(`BitsPerSample lists ${bpsList.length} values for ${spp} sample(s) per pixel`);
  }
  if (bpsList.some((b) => b !== bps)) {
    throw cannot(name, `uses different bit depths per channel (${bpsList.join(', ')})`, 'save it as greyscale with 8, 16 or 32 bit');
  }
  if (bps !== 8 && bps !== 16 && bps !== 32) {
    throw cannot(name, `uses ${bps}-bit samples`, 'save it as 8, 16 or 32 bit');
  }
  let format = list(T.sampleFormat)?.[0] ?? 1;
  if (format === 4) format = 1; // "undefined" data: treat as unsigned
  if (format !== 1 && format !== 2 && format !== 3) {
    throw cannot(name, `uses sample format ${format} (complex numbers)`, 'save it as integers or 32-bit float');
  }
  if (format === 3 && bps !== 32) {
    throw cannot(name, `uses ${bps}-bit floating-point samples`, 'save it as 32-bit float or as 8 or 16-bit integers');
  }
  let compression = one(T.compression, 1);
  if (!READABLE_COMPRESSION.has(compression)) {
    const label = COMPRESSION_NAME[compression] ?? 'an unknown scheme';
    throw cannot(name, `uses TIFF compression ${compression} (${label})`, 'save it uncompressed or with LZW, Deflate or PackBits compression');
  }
  if (compression === 32946) compression = 8; // same zlib stream (TIFF technical note 2)
  const photometric = one(T.photometric, 1);
  if (photometric === 0 || photometric === 1) {
    const extra = list(T.extraSamples)?.length ?? 0;
    if (spp !== 1 + extra) throw damaged(`a greyscale image with ${spp} samples per pixel but ${extra} declared extra sample(s)`);
    if (photometric === 0 && format !== 1) {
      throw cannot(name, 'stores signed or float samples with white as zero', 'save it with black as zero (BlackIsZero)');
    }
  } else if (photometric === 2) {
    if (spp < 3) throw damaged(`an RGB image with ${spp} sample(s) per pixel`);
    const extra = list(T.extraSamples)?.length ?? 0;
    if (spp !== 3 + extra) throw damaged(`an RGB image with ${spp} samples per pixel but ${extra} declared extra sample(s)`);
  } else if (photometric === 3) {
    if (spp !== 1 || format !== 1 || bps === 32) throw cannot(name, `uses a ${bps}-bit palette`, 'save it as greyscale');
  } else {
    const label = PHOTOMETRIC_NAME[photometric] ?? `number ${photometric}`;
    throw cannot(name, `uses the ${label} colour model`, 'save it as greyscale or RGB');
  }
  const orientation = one(T.orientation, 1);
  if (orientation !== 1) {
    throw cannot(name, `has orientation ${orientation} (rows not stored top to bottom, left to right)`, 'save it with the default orientation');
  }
  if (spp > 1 && one(T.planar, 1) === 2) {
    throw cannot(name, 'stores each channel in a separate plane', 'save it as greyscale or as ordinary (chunky) RGB');
  }
  const predictor = one(T.predictor, 1);
  if (predictor === 3 || (predictor === 2 && format === 3)) {
    throw cannot(name, 'uses the floating-point predictor', 'save it without a predictor');
  }
  if (predictor !== 1 && predictor !== 2 && predictor !== 3) throw damaged(`unknown predictor ${predictor}`);
  const tiled = dir.numbers.has(T.tileWidth);

  // strip or tile layout, checked against the file size and against each other
  const sampleBytes = bps / 8;
  const rowBytes = width * spp * sampleBytes;
  const rawBytes = height * rowBytes;
  if (rawBytes > MAX_RAW_BYTES) {
    throw new InputError(`${name} holds ${Math.round(rawBytes / 2 ** 20)} MB of pixel data, more than thinfoil reads (${MAX_RAW_BYTES / 2 ** 20} MB); save it as greyscale or crop it first.`);
  }
  const offsets = list(tiled ? T.tileOffsets : T.stripOffsets);
  const counts = list(tiled ? T.tileByteCounts : T.stripByteCounts);
  let blockCount: number;
  let rowsPerStrip = height;
  let tileWidth = width;
  let tileLength = height;
  if (tiled) {
    tileWidth = one(T.tileWidth);
    tileLength = one(T.tileLength);
    if (tileWidth === 0 || tileLength === 0) throw damaged('the tile size is 0');
    if (tileWidth > MAX_TILE_SIDE || tileLength > MAX_TILE_SIDE) {
      throw cannot(name, `uses ${tileWidth} x ${tileLength} pixel tiles (more than ${MAX_TILE_SIDE} on a side)`, 'save it with strips or smaller tiles');
    }
    blockCount = Math.ceil(width / tileWidth) * Math.ceil(height / tileLength);
  } else {
    rowsPerStrip = Math.min(one(T.rowsPerStrip, height), height);
    if (rowsPerStrip === 0) throw damaged('RowsPerStrip is 0');
    blockCount = Math.ceil(height / rowsPerStrip);
  }
  const fullBlockBytes = tiled ? tileWidth * tileLength * spp * sampleBytes : rowsPerStrip * rowBytes;
  if (offsets === undefined || offsets.length < blockCount) {
    throw damaged(`the image needs ${blockCount} ${tiled ? 'tiles' : 'strips'} but the file locates ${offsets?.length ?? 0}`);
  }
  if (compression !== 1 && (counts === undefined || counts.length < blockCount)) throw damaged('the pixel data sizes are missing');
  if (counts !== undefined && counts.length < blockCount) throw damaged('the pixel data sizes are unreadable');
  /** Bytes block i must decode to: a full tile, or the rows of strip i that lie inside the image. */
  const needBytes = (i: number): number => (tiled ? fullBlockBytes : Math.min(rowsPerStrip, height - i * rowsPerStrip) * rowBytes);
  for (let i = 0; i < blockCount; i++) {
    const need = needBytes(i);
    let stored: number;
    if (compression === 1) {
      stored = need;
      const declared = counts?.[i];
      // uncompressed: the declared size must be the geometry's (a short final strip may be stored full size)
      if (declared !== undefined && declared !== need && !(declared === fullBlockBytes && !tiled)) {
        throw damaged(
          `${tiled ? 'tile' : 'strip'} ${i} holds ${declared} bytes but ${width} x ${height} pixels with ${spp} sample(s) of ${bps} bits need ${need}`,
        );
      }
    } else {
      stored = (counts as number[])[i];
    }
    if (!Number.isInteger(offsets[i]) || offsets[i] + stored > bytes.length) throw damaged('the pixel data runs past the end of the file');
  }

  const count = width * height * spp;
  let raw: Uint8Array;
  if (compression === 1 && !tiled) {
    // uncompressed strips: plain copies, in the file's byte order
    raw = new Uint8Array(rawBytes);
    for (let i = 0; i < blockCount; i++) {
      const start = i * rowsPerStrip * rowBytes;
      raw.set(bytes.subarray(offsets[i], offsets[i] + needBytes(i)), start);
    }
  } else {
    raw = decodeBlocks(bytes, {
      width,
      height,
      spp,
      sampleBytes,
      compression,
      tiled,
      tileWidth,
      tileLength,
      rowsPerStrip,
      offsets,
      counts: counts ?? [],
      needBytes,
      fullBlockBytes,
    }, damaged);
  }
  const order16LE = dir.littleEndian;

  const samples = samplesFrom(raw, count, bps, order16LE, dir.littleEndian);
  if (predictor === 2) undoPredictor(samples, width, height, spp, tiled ? tileWidth : width);
  const values = typedView(samples, format);

  const n = width * height;
  const data = new Float32Array(n);
  let bitDepth = bps;
  if (photometric === 2) {
    for (let i = 0; i < n; i++) data[i] = lumaRec601(values[i * spp], values[i * spp + 1], values[i * spp + 2]);
  } else if (photometric === 3) {
    const map = list(T.colorMap);
    const entries = 2 ** bps;
    if (map === undefined || map.length < 3 * entries) throw damaged('the colour map is missing or short');
    for (let i = 0; i < n; i++) {
      const v = values[i];
      data[i] = lumaRec601(map[v], map[entries + v], map[2 * entries + v]);
    }
    bitDepth = 16; // ColorMap entries are 16-bit (TIFF 6.0, section 5)
  } else if (photometric === 0) {
    const white = 2 ** bps - 1;
    for (let i = 0; i < n; i++) data[i] = white - values[i * spp];
  } else {
    for (let i = 0; i < n; i++) data[i] = values[i * spp];
  }
  if (format === 3) {
    let bad = 0;
    for (let i = 0; i < n; i++) if (data[i] - data[i] !== 0) bad++;
    if (bad > 0) {
      throw new InputError(`${name} has ${bad} NaN or infinite pixel values; replace them with numbers before importing it.`);
    }
  }
  const pixel_nm = pixelSize_nm(dir);
  return { width, height, data, bitDepth, kind: 'tiff', ...(pixel_nm !== undefined ? { pixel_nm } : {}) };
}
