/**
 * decodeImage against files written by an independent tool: Debian's
 * python3-pil, driven by test/imageio/pil_images.py, which also records the
 * values a reader must return (and checks each file by reading it back with
 * PIL). Format references: PNG specification (ISO/IEC 15948), TIFF 6.0
 * specification (Adobe 1992); colour to grey by ITU-R BT.601 (Rec. 601) luma.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { decodeImage } from '../../src/imageio/readImage.js';
import { encodeFloatTiff } from '../../src/output/tiff.js';
import { encodeGreyPng } from '../../src/output/png.js';
import { needPython, runPython } from '../python.js';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const pil = needPython('PIL', 'numpy');

interface Case {
  file: string;
  kind?: 'png' | 'tiff';
  width?: number;
  height?: number;
  bitDepth?: number;
  expected?: number[];
  pixel_nm?: number;
  error?: string;
}

function expectInputError(fn: () => unknown, part: string): void {
  let caught: unknown;
  try {
    fn();
  } catch (err) {
    caught = err;
  }
  expect(caught).toBeInstanceOf(InputError);
  expect((caught as Error).message).toContain(part);
}

/** Writes the PIL files at collection time so each one becomes its own test. */
function makePilFiles(): { dir: string; cases: Case[] } {
  if (!pil.ok) return { dir: '', cases: [] };
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-imageio-'));
  runPython([path.join(HERE, 'pil_images.py'), dir]);
  const cases = JSON.parse(fs.readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as Case[];
  return { dir, cases };
}
const PIL_FILES = makePilFiles();
const READABLE = PIL_FILES.cases.filter((c) => c.error === undefined);
const REFUSED = PIL_FILES.cases.filter((c) => c.error !== undefined);

describe('decodeImage: files written by Python PIL (test/imageio/pil_images.py)', () => {
  const { dir } = PIL_FILES;
  afterAll(() => {
    if (dir !== '') fs.rmSync(dir, { recursive: true, force: true });
  });

  it('the generator wrote the full set of files', (ctx) => {
    pil.require(ctx);
    expect(READABLE.length).toBe(52);
    expect(REFUSED.length).toBe(7);
  });

  it.for(READABLE.map((c) => [c.file, c] as const))('reads %s to the values PIL wrote, exactly', ([, c], ctx) => {
    pil.require(ctx);
    const bytes = fs.readFileSync(path.join(dir, c.file));
    const img = decodeImage(bytes, c.file);
    expect({ kind: img.kind, w: img.width, h: img.height, bits: img.bitDepth }).toEqual({
      kind: c.kind,
      w: c.width,
      h: c.height,
      bits: c.bitDepth,
    });
    const exp = c.expected as number[];
    expect(img.data.length).toBe(exp.length);
    // Expected values are float32 numbers written as exact decimal text by
    // numpy; stored samples and Rec. 601 luma (0.299 R + 0.587 G + 0.114 B,
    // ITU-R BT.601, evaluated in the same order in float64) must agree bit for bit.
    let mismatches = 0;
    let first = -1;
    for (let i = 0; i < exp.length; i++) {
      if (!Object.is(img.data[i], exp[i])) {
        mismatches++;
        if (first < 0) first = i;
      }
    }
    expect({ mismatches, first, got: img.data[first], want: exp[first] }).toEqual({
      mismatches: 0,
      first: -1,
      got: undefined,
      want: undefined,
    });
    if (c.pixel_nm !== undefined) {
      // TIFF resolution fields (TIFF 6.0, section 8) or PNG pHYs (ISO/IEC 15948, 11.3.5.3);
      // the expected size is computed by the generator from the values it wrote
      expect(img.pixel_nm).toBeDefined();
      expect(Math.abs((img.pixel_nm as number) / c.pixel_nm - 1)).toBeLessThan(1e-12);
    } else {
      expect(img.pixel_nm).toBeUndefined();
    }
  });

  it.for(REFUSED.map((c) => [c.file, c] as const))('refuses %s with an InputError naming the file and the problem', ([, c], ctx) => {
    pil.require(ctx);
    const bytes = fs.readFileSync(path.join(dir, c.file));
    expectInputError(() => decodeImage(bytes, c.file), `${c.file} `);
    expectInputError(() => decodeImage(bytes, c.file), c.error as string);
  });

  it('reads a file held in a Buffer view at a non-zero offset of a larger buffer', (ctx) => {
    pil.require(ctx);
    for (const file of ['tif_F32_lzw.tif', 'tif_I16_raw.tif', 'png_I16.png']) {
      const bytes = fs.readFileSync(path.join(dir, file));
      const big = Buffer.alloc(bytes.length + 13, 0x55);
      bytes.copy(big, 7);
      const view = big.subarray(7, 7 + bytes.length);
      const a = decodeImage(bytes, file);
      const b = decodeImage(view, file);
      expect(b.data).toEqual(a.data);
    }
  });
});

describe('decodeImage: our own writers read back', () => {
  it('float TIFF round trip keeps every value and the pixel size', () => {
    const w = 33;
    const h = 17;
    const img = new Float32Array(w * h);
    for (let i = 0; i < img.length; i++) img[i] = Math.fround(Math.sin(i * 0.37) * 1e4 - i * 1e-3);
    img[5] = -0;
    img[6] = 1e-42; // subnormal float32
    const bytes = encodeFloatTiff(img, w, h, { pixel_nm: 0.3, description: 'round trip' });
    const back = decodeImage(bytes, 'own.tif');
    expect(back.kind).toBe('tiff');
    expect(back.bitDepth).toBe(32);
    expect([back.width, back.height]).toEqual([w, h]);
    for (let i = 0; i < img.length; i++) expect(Object.is(back.data[i], img[i])).toBe(true);
    // 0.3 nm -> 1e7/0.3 px/cm stored as the rational 100000000/3 (TIFF 6.0 RATIONAL)
    expect(Math.abs((back.pixel_nm as number) / 0.3 - 1)).toBeLessThan(1e-15);
  });

  it('float TIFF in many strips reads back', () => {
    const w = 700;
    const h = 300; // 840 kB: several 256 kB strips
    const img = new Float32Array(w * h).map((_, i) => Math.fround(i * 0.5 - 7));
    const back = decodeImage(encodeFloatTiff(img, w, h), 'strips.tif');
    let same = back.data.length === img.length;
    for (let i = 0; same && i < img.length; i++) same = back.data[i] === img[i];
    expect(same).toBe(true);
    expect(back.pixel_nm).toBeUndefined(); // ResolutionUnit 1: no absolute unit
  });

  it('grey PNG round trip', () => {
    const px = new Uint8Array(40 * 30).map((_, i) => (i * 7) & 255);
    const back = decodeImage(encodeGreyPng(px, 40, 30), 'own.png');
    expect(back.kind).toBe('png');
    expect(back.bitDepth).toBe(8);
    expect(Array.from(back.data)).toEqual(Array.from(px));
  });
});

describe('decodeImage: garbage and damaged input', () => {
  it('random bytes are not a PNG or TIFF file', () => {
    let seed = 12345;
    const junk = new Uint8Array(4096).map(() => {
      seed = (seed * 1103515245 + 12345) >>> 0;
      return seed >>> 24;
    });
    expectInputError(() => decodeImage(junk, 'junk.bin'), 'junk.bin is not a PNG or TIFF file');
  });

  it('an empty file is reported as empty', () => {
    expectInputError(() => decodeImage(new Uint8Array(0), 'empty.tif'), 'empty.tif is empty');
  });

  it('a JPEG signature is not a PNG or TIFF file', () => {
    const jpeg = new Uint8Array([0xff, 0xd8, 0xff, 0xe0, 0, 16, 0x4a, 0x46, 0x49, 0x46, 0, 1]);
    expectInputError(() => decodeImage(jpeg, 'x.jpg'), 'is not a PNG or TIFF file');
  });

  it('a TIFF header pointing outside the file is damaged', () => {
    const b = new Uint8Array([0x49, 0x49, 42, 0, 0xff, 0xff, 0, 0, 0, 0]);
    expectInputError(() => decodeImage(b, 'bad.tif'), 'bad.tif is a damaged or truncated TIFF file');
  });

  it('a BigTIFF header is refused with its own message', () => {
    const b = new Uint8Array([0x49, 0x49, 43, 0, 8, 0, 0, 0, 16, 0, 0, 0, 0, 0, 0, 0]);
    expectInputError(() => decodeImage(b, 'big.tif'), 'is a BigTIFF file');
  });

  it('a PNG with a corrupted pixel byte fails its CRC check', () => {
    const px = new Uint8Array(16 * 16).fill(9);
    const png = encodeGreyPng(px, 16, 16).slice();
    const idat = Buffer.from(png).indexOf('IDAT');
    png[idat + 6] ^= 0xff;
    expectInputError(() => decodeImage(png, 'crc.png'), 'crc.png is a damaged PNG file');
  });

  it('a TIFF with NaN pixels is refused', () => {
    const img = new Float32Array([1, 2, 3, 4]);
    const bytes = encodeFloatTiff(img, 2, 2);
    // overwrite the last pixel with a NaN bit pattern (little-endian)
    new DataView(bytes.buffer).setFloat32(bytes.length - 4, NaN, true);
    expectInputError(() => decodeImage(bytes, 'nan.tif'), 'nan.tif has 1 NaN or infinite pixel values');
  });
});
