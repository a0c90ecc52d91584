/**
 * 32-bit floating-point greyscale TIFF writer, from the TIFF 6.0
 * specification (Adobe, 1992): little-endian ("II") baseline file with one
 * image file directory (IFD), uncompressed strips, one IEEE float sample per
 * pixel (SampleFormat 3, section 19), PhotometricInterpretation 1
 * (BlackIsZero).
 *
 * Pixel size. Scientific image programs read a calibration in nm from the
 * convention of the ImageJ family (also written and read by the tifffile
 * library): ResolutionUnit 1 (no absolute unit), XResolution/YResolution in
 * pixels per `unit`, and an ImageDescription that starts with "ImageJ=" and
 * holds the line "unit=nm". We write exactly that: pixels per nm = 1 /
 * pixel_nm as the best 32-bit rational, and our own free text as further
 * description lines without "=" (so no reader takes them for settings).
 * Readers that only know the TIFF 6.0 units see a resolution without unit.
 * Without a pixel size, ResolutionUnit is 1 and both resolutions are 1/1, as
 * the baseline requires the fields, and the description is our text alone.
 *
 * Layout: header (8 bytes) | IFD | values that do not fit in 4 bytes | strips.
 * Every offset is a multiple of 4, so strips can be viewed as Float32Array.
 */
import { InputError } from '../errors.js';
import { toRational32, UINT32_MAX } from './rational.js';

export interface FloatTiffOptions {
  /** Pixel size in nm; written as pixels per cm (ResolutionUnit 3). */
  pixel_nm?: number;
  /** Free text for ImageDescription (tag 270); non-ASCII characters become '?'. */
  description?: string;
}

/** TIFF field types (TIFF 6.0, section 2). */
const SHORT = 3;
const LONG = 4;
const ASCII = 2;
const RATIONAL = 5;
const FLOAT = 11;
const TYPE_SIZE: Readonly<Record<number, number>> = { [ASCII]: 1, [SHORT]: 2, [LONG]: 4, [RATIONAL]: 8, [FLOAT]: 4 };

/** Tags used (TIFF 6.0, sections 8 and 19). */
const TAG = {
  ImageWidth: 256,
  ImageLength: 257,
  BitsPerSample: 258,
  Compression: 259,
  PhotometricInterpretation: 262,
  ImageDescription: 270,
  StripOffsets: 273,
  SamplesPerPixel: 277,
  RowsPerStrip: 278,
  StripByteCounts: 279,
  XResolution: 282,
  YResolution: 283,
  PlanarConfiguration: 284,
  ResolutionUnit: 296,
  Software: 305,
  SampleFormat: 339,
  SMinSampleValue: 340,
  SMaxSampleValue: 341,
} as const;

/** Strips of about this many bytes (a few strips for a typical image). */
const STRIP_TARGET_BYTES = 256 * 1024;

type Entry = { tag: number; type: number; values: readonly number[] } | { tag: number; type: typeof ASCII; text: string };

function asciiBytes(text: string): Uint8Array {
  // TIFF ASCII is 7-bit with a terminating NUL (TIFF 6.0, section 2)
  const out = new Uint8Array(text.length + 1);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    out[i] = c > 0 && c < 0x80 ? c : 0x3f; // '?'
  }
  return out;
}

function entryBytes(e: Entry): Uint8Array {
  if ('text' in e) return asciiBytes(e.text);
  const size = TYPE_SIZE[e.type];
  const out = new Uint8Array(e.values.length * size);
  const dv = new DataView(out.buffer);
  e.values.forEach((v, i) => {
    if (e.type === SHORT) dv.setUint16(2 * i, v, true);
    else if (e.type === LONG) dv.setUint32(4 * i, v, true);
    else if (e.type === FLOAT) dv.setFloat32(4 * i, v, true);
    else throw new Error(`tiff: unexpected field type ${e.type}`);
  });
  return out;
}

const align4 = (n: number): number => (n + 3) & ~3;

/** Marker line of the ImageJ-family description (the version string tifffile writes too). */
export const CALIBRATION_MARKER = 'ImageJ=1.11a';

/** The description of a calibrated image: the settings lines, then our text with "=" replaced and line breaks removed. */
export function calibratedDescription(text?: string): string {
  const lines = [CALIBRATION_MARKER, 'images=1', 'unit=nm'];
  if (text !== undefined && text !== '') lines.push(text.replace(/=/g, ':').replace(/[\r\n]+/g, ' '));
  return `${lines.join('\n')}\n`;
}

function minMax(img: Float32Array): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  let bad = 0;
  for (let i = 0; i < img.length; i++) {
    const v = img[i];
    if (v - v !== 0) bad++;
    else {
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  if (bad > 0) throw new RangeError(`encodeFloatTiff: the image has ${bad} NaN or infinite pixel values.`);
  return { min, max };
}

const LITTLE_ENDIAN_HOST = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Encode a width x height float image (row by row, top row first) as a TIFF file. */
export function encodeFloatTiff(img: Float32Array, width: number, height: number, opts: FloatTiffOptions = {}): Uint8Array {
  if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
    throw new RangeError(`encodeFloatTiff: width and height must be positive integers, got ${width} x ${height}.`);
  }
  if (img.length !== width * height) {
    throw new RangeError(`encodeFloatTiff: expected ${width * height} pixels for ${width} x ${height}, got ${img.length}.`);
  }
  const rowBytes = 4 * width;
  const imageBytes = rowBytes * height;
  if (imageBytes > UINT32_MAX - 1_000_000) throw new RangeError('encodeFloatTiff: the image exceeds the 4 GiB TIFF limit.');
  const { min, max } = minMax(img);

  let resolution: [number, number] = [1, 1];
  const resolutionUnit = 1; // no absolute unit: the unit is named in the description (see the header)
  let description = opts.description;
  if (opts.pixel_nm !== undefined) {
    const p = opts.pixel_nm;
    const perNm = 1 / p;
    // pixel sizes from 1e-3 nm to 1e6 nm (the rational then keeps at least 6 digits)
    if (!(Number.isFinite(p) && p >= 1e-3 && p <= 1e6)) {
      throw new InputError(`pixel_nm must be a positive number between 0.001 and 1e6 nm to be stored in a TIFF file, got ${p}.`);
    }
    resolution = toRational32(perNm);
    description = calibratedDescription(opts.description);
  }

  const rowsPerStrip = Math.max(1, Math.min(height, Math.floor(STRIP_TARGET_BYTES / rowBytes)));
  const nStrips = Math.ceil(height / rowsPerStrip);
  const stripCounts: number[] = [];
  for (let s = 0; s < nStrips; s++) stripCounts.push(rowBytes * Math.min(rowsPerStrip, height - s * rowsPerStrip));

  // strip offsets depend on the layout, so build the entries with placeholders first
  const entries: Entry[] = [
    { tag: TAG.ImageWidth, type: LONG, values: [width] },
    { tag: TAG.ImageLength, type: LONG, values: [height] },
    { tag: TAG.BitsPerSample, type: SHORT, values: [32] },
    { tag: TAG.Compression, type: SHORT, values: [1] },
    { tag: TAG.PhotometricInterpretation, type: SHORT, values: [1] },
    ...(description !== undefined ? [{ tag: TAG.ImageDescription, type: ASCII, text: description } as Entry] : []),
    { tag: TAG.StripOffsets, type: LONG, values: new Array<number>(nStrips).fill(0) },
    { tag: TAG.SamplesPerPixel, type: SHORT, values: [1] },
    { tag: TAG.RowsPerStrip, type: LONG, values: [rowsPerStrip] },
    { tag: TAG.StripByteCounts, type: LONG, values: stripCounts },
    { tag: TAG.XResolution, type: RATIONAL, values: resolution },
    { tag: TAG.YResolution, type: RATIONAL, values: resolution },
    { tag: TAG.PlanarConfiguration, type: SHORT, values: [1] },
    { tag: TAG.ResolutionUnit, type: SHORT, values: [resolutionUnit] },
    { tag: TAG.Software, type: ASCII, text: 'thinfoil' },
    { tag: TAG.SampleFormat, type: SHORT, values: [3] },
    { tag: TAG.SMinSampleValue, type: FLOAT, values: [min] },
    { tag: TAG.SMaxSampleValue, type: FLOAT, values: [max] },
  ];

  const ifdOffset = 8;
  const ifdSize = 2 + 12 * entries.length + 4;
  // sizes of out-of-line values; RATIONAL values are LONG pairs
  const payload = (e: Entry): Uint8Array => {
    if ('text' in e) return asciiBytes(e.text);
    if (e.type === RATIONAL) return entryBytes({ tag: e.tag, type: LONG, values: e.values });
    return entryBytes(e);
  };
  let cursor = align4(ifdOffset + ifdSize);
  const placed = entries.map((e) => {
    const bytes = payload(e);
    if (bytes.length <= 4) return { e, bytes, offset: -1 };
    const offset = cursor;
    cursor = align4(cursor + bytes.length);
    return { e, bytes, offset };
  });
  const dataOffset = cursor;
  const stripOffsets = stripCounts.map((_, s) => dataOffset + s * rowsPerStrip * rowBytes);
  // now that offsets are known, refresh the StripOffsets payload
  for (const p of placed) {
    if (p.e.tag === TAG.StripOffsets) p.bytes = entryBytes({ tag: TAG.StripOffsets, type: LONG, values: stripOffsets });
  }

  const out = new Uint8Array(dataOffset + imageBytes);
  const dv = new DataView(out.buffer);
  out[0] = 0x49; // 'I'
  out[1] = 0x49;
  dv.setUint16(2, 42, true);
  dv.setUint32(4, ifdOffset, true);
  dv.setUint16(ifdOffset, entries.length, true);
  placed.forEach((p, i) => {
    const at = ifdOffset + 2 + 12 * i;
    const count = 'text' in p.e ? p.bytes.length : p.e.type === RATIONAL ? p.e.values.length / 2 : p.e.values.length;
    dv.setUint16(at, p.e.tag, true);
    dv.setUint16(at + 2, p.e.type, true);
    dv.setUint32(at + 4, count, true);
    if (p.offset < 0) out.set(p.bytes, at + 8); // left-justified in the value field
    else {
      dv.setUint32(at + 8, p.offset, true);
      out.set(p.bytes, p.offset);
    }
  });
  dv.setUint32(ifdOffset + 2 + 12 * entries.length, 0, true); // no next IFD

  if (LITTLE_ENDIAN_HOST) {
    out.set(new Uint8Array(img.buffer, img.byteOffset, imageBytes), dataOffset);
  } else {
    for (let i = 0; i < img.length; i++) dv.setFloat32(dataOffset + 4 * i, img[i], true);
  }
  return out;
}
