/**
 * encodeFloatTiff checked with two independent readers: npm utif and Debian's
 * Python PIL (both its own TIFF parser and, with READ_LIBTIFF, libtiff).
 * Format: TIFF 6.0 specification (Adobe 1992): section 2 (header, IFD,
 * RATIONAL), section 8 (XResolution, YResolution, ResolutionUnit 1 = no
 * absolute unit, the unit named in the ImageJ-family description "unit=nm", as
 * the tifffile library writes it), section 19 (SampleFormat 3 = IEEE float,
 * SMin/SMaxSampleValue).
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createRequire } from 'node:module';
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.js';
import { calibratedDescription, encodeFloatTiff } from '../../src/output/tiff.js';
import { toRational32 } from '../../src/output/rational.js';
import { needPython, runPython } from '../python.js';

interface UtifIfd {
  [tag: string]: unknown;
  data: Uint8Array;
  width: number;
  height: number;
}
const require = createRequire(import.meta.url);
const UTIF = require('utif') as {
  decode(buf: ArrayBuffer): UtifIfd[];
  decodeImage(buf: ArrayBuffer, ifd: UtifIfd): void;
};

const pil = needPython('PIL', 'numpy');
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-tiff-'));
afterAll(() => fs.rmSync(TMP, { recursive: true, force: true }));

/** A test image with awkward values: signed zero, a float32 subnormal, the extremes. */
function testImage(w: number, h: number): Float32Array {
  const img = new Float32Array(w * h);
  for (let i = 0; i < img.length; i++) img[i] = Math.fround(Math.cos(i * 0.731) * 250 + i * 1e-4);
  img.set([0, -0, 1e-42, -3.4e38, 3.4e38, 1.5, -2.75], 0);
  return img;
}

function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

function floatBytesLE(img: Float32Array): Uint8Array {
  const out = new Uint8Array(img.length * 4);
  const dv = new DataView(out.buffer);
  img.forEach((v, i) => dv.setFloat32(4 * i, v, true));
  return out;
}

function readWithUtif(bytes: Uint8Array): { ifd: UtifIfd; values: Float32Array } {
  const buf = new Uint8Array(bytes).buffer;
  const ifds = UTIF.decode(buf);
  expect(ifds.length).toBe(1);
  const ifd = ifds[0];
  UTIF.decodeImage(buf, ifd);
  const d = ifd.data;
  const dv = new DataView(d.buffer, d.byteOffset, d.byteLength);
  const values = new Float32Array(d.byteLength / 4);
  for (let i = 0; i < values.length; i++) values[i] = dv.getFloat32(4 * i, true);
  return { ifd, values };
}

const PIL_READER = String.raw`
import hashlib, json, sys
import numpy as np
from PIL import Image, TiffImagePlugin
TiffImagePlugin.READ_LIBTIFF = sys.argv[2] == "libtiff"
im = Image.open(sys.argv[1])
tags = im.tag_v2
arr = np.asarray(im)
def rat(v):
    return [int(v.numerator), int(v.denominator)]
def one(v):
    return v[0] if isinstance(v, tuple) else v
out = {
    "mode": im.mode, "size": list(im.size),
    "sha256": hashlib.sha256(arr.astype("<f4").tobytes()).hexdigest(),
    "first": [float(v) for v in arr.ravel()[:7]],
    "x_res": rat(tags[282]), "y_res": rat(tags[283]), "unit": int(tags[296]),
    "description": tags.get(270), "sample_format": list(tags[339]) if isinstance(tags[339], tuple) else [tags[339]],
    "bits": list(tags[258]) if isinstance(tags[258], tuple) else [tags[258]],
    "smin": float(one(tags[340])) if 340 in tags else None, "smax": float(one(tags[341])) if 341 in tags else None,
    "strips": len(tags[273]),
}
im.load()
print(json.dumps(out))
`;

interface PilView {
  mode: string;
  size: [number, number];
  sha256: string;
  first: number[];
  x_res: [number, number];
  y_res: [number, number];
  unit: number;
  description: string | null;
  sample_format: number[];
  bits: number[];
  smin: number | null;
  smax: number | null;
  strips: number;
}

function readWithPil(file: string, via: 'pil' | 'libtiff'): PilView {
  const { stdout, stderr } = runPython(['-c', PIL_READER, file, via]);
  expect(stderr).toBe(''); // no warnings printed by PIL or libtiff
  return JSON.parse(stdout) as PilView;
}

describe('encodeFloatTiff read by npm utif', () => {
  it('gives back the same float32 values, size and fields', () => {
    const w = 37;
    const h = 23;
    const img = testImage(w, h);
    const bytes = encodeFloatTiff(img, w, h, { pixel_nm: 0.3, description: 'thinfoil test: bright field, g = 1 1 -1' });
    const { ifd, values } = readWithUtif(bytes);
    expect([ifd.width, ifd.height]).toEqual([w, h]);
    for (let i = 0; i < img.length; i++) expect(Object.is(values[i], img[i])).toBe(true);
    expect(ifd.t258).toEqual([32]); // BitsPerSample (TIFF 6.0, section 8)
    expect(ifd.t339).toEqual([3]); // SampleFormat 3 = IEEE floating point (section 19)
    expect(ifd.t262).toEqual([1]); // BlackIsZero
    expect(ifd.t259).toEqual([1]); // no compression
    expect(ifd.t296).toEqual([1]); // ResolutionUnit 1: the unit is named in the description
    // utif divides the RATIONAL numerator by the denominator: pixels per nm = 1 / pixel_nm
    expect(Math.abs((ifd.t282 as number[])[0] / (1 / 0.3) - 1)).toBeLessThan(1e-15);
    expect(ifd.t270).toEqual([calibratedDescription('thinfoil test: bright field, g = 1 1 -1')]);
    expect(ifd.t270).toEqual(['ImageJ=1.11a\nimages=1\nunit=nm\nthinfoil test: bright field, g : 1 1 -1\n']);
  });
});

describe('encodeFloatTiff read by Python PIL', () => {

  it.for(['pil', 'libtiff'] as const)(
    'reader %s: mode F, the same float32 values, resolution 10/3 px per nm',
    (via, ctx) => {
      pil.require(ctx);
      const w = 37;
      const h = 23;
      const img = testImage(w, h);
      const file = path.join(TMP, `small-${via}.tif`);
      fs.writeFileSync(file, encodeFloatTiff(img, w, h, { pixel_nm: 0.3, description: 'pixel 0.3 nm' }));
      const v = readWithPil(file, via);
      expect(v.mode).toBe('F'); // PIL mode F = 32-bit float
      expect(v.size).toEqual([w, h]);
      expect(v.sha256).toBe(sha256(floatBytesLE(img)));
      v.first.forEach((x, i) => expect(Object.is(x, img[i])).toBe(true)); // -0 and the subnormal survive
      // 1 / 0.3 px per nm is exactly 10/3 (TIFF 6.0 RATIONAL, ResolutionUnit 1, unit=nm in the description)
      expect(v.x_res).toEqual([10, 3]);
      expect(v.y_res).toEqual([10, 3]);
      expect(v.unit).toBe(1);
      expect(v.description).toBe('ImageJ=1.11a\nimages=1\nunit=nm\npixel 0.3 nm\n');
      expect(v.sample_format).toEqual([3]);
      expect(v.bits).toEqual([32]);
      expect(v.smin).toBe(Math.fround(-3.4e38)); // SMinSampleValue (section 19)
      expect(v.smax).toBe(Math.fround(3.4e38));
    },
  );

  it('a 600 x 500 image in several strips reads back exactly in both PIL paths', (ctx) => {
    pil.require(ctx);
    const w = 600;
    const h = 500;
    const img = testImage(w, h);
    const file = path.join(TMP, 'big.tif');
    fs.writeFileSync(file, encodeFloatTiff(img, w, h, { pixel_nm: 1.25 }));
    for (const via of ['pil', 'libtiff'] as const) {
      const v = readWithPil(file, via);
      expect(v.strips).toBeGreaterThan(1);
      expect(v.sha256).toBe(sha256(floatBytesLE(img)));
      expect(v.x_res).toEqual([4, 5]); // 1 / 1.25 px per nm
    }
  });

  it('keeps the pixel size to 1e-9 relative for awkward values', (ctx) => {
    pil.require(ctx);
    for (const p of [0.0173, 0.123456789, 1.234567, 7.77, 333.3, 25000]) {
      const file = path.join(TMP, `res-${p}.tif`);
      fs.writeFileSync(file, encodeFloatTiff(new Float32Array([1, 2, 3, 4]), 2, 2, { pixel_nm: p }));
      const v = readWithPil(file, 'pil');
      const perNm = v.x_res[0] / v.x_res[1];
      expect(v.unit).toBe(1);
      // 32-bit numerator and denominator: the continued-fraction convergent of 1 / p
      // keeps a relative error near 2^-32 or better; 1e-9 is far below the float32
      // precision of the pixel values.
      expect(Math.abs(1 / perNm / p - 1)).toBeLessThan(1e-9);
    }
  });

  it('without a pixel size writes ResolutionUnit 1 (no absolute unit) and 1/1', (ctx) => {
    pil.require(ctx);
    const file = path.join(TMP, 'nounit.tif');
    fs.writeFileSync(file, encodeFloatTiff(new Float32Array([5, 6]), 2, 1));
    const v = readWithPil(file, 'libtiff');
    expect(v.unit).toBe(1);
    expect(v.x_res).toEqual([1, 1]);
    expect(v.description).toBeNull();
  });

  it('replaces non-ASCII description characters by ? (TIFF ASCII is 7-bit)', (ctx) => {
    pil.require(ctx);
    const file = path.join(TMP, 'ascii.tif');
    fs.writeFileSync(file, encodeFloatTiff(new Float32Array([1]), 1, 1, { description: 'ξg = 25 nm, 2θ' }));
    expect(readWithPil(file, 'pil').description).toBe('?g = 25 nm, 2?');
  });
});

describe('encodeFloatTiff structure and arguments', () => {
  it('starts with the little-endian header II 42 and word-aligned offsets', () => {
    const bytes = encodeFloatTiff(testImage(9, 7), 9, 7, { pixel_nm: 2 });
    expect(Array.from(bytes.subarray(0, 4))).toEqual([0x49, 0x49, 42, 0]); // TIFF 6.0, section 2
    const dv = new DataView(bytes.buffer);
    const ifd = dv.getUint32(4, true);
    expect(ifd % 2).toBe(0); // "The directory may be at any location ... but must begin on a word boundary"
    const n = dv.getUint16(ifd, true);
    const tags: number[] = [];
    for (let i = 0; i < n; i++) tags.push(dv.getUint16(ifd + 2 + 12 * i, true));
    expect(tags).toEqual([...tags].sort((a, b) => a - b)); // "sorted in ascending order by the Tag"
  });

  it('chooses exact 32-bit rationals where they exist', () => {
    expect(toRational32(1e7 / 0.3)).toEqual([100000000, 3]);
    expect(toRational32(1e7 / 0.5)).toEqual([20000000, 1]);
    expect(toRational32(0.75)).toEqual([3, 4]);
    expect(() => toRational32(1e-10)).toThrow(RangeError);
  });

  it('refuses a bad pixel size with an InputError and NaN pixels with a RangeError', () => {
    const img = new Float32Array([1, 2]);
    for (const p of [0, -1, NaN, Infinity, 1e-4]) expect(() => encodeFloatTiff(img, 2, 1, { pixel_nm: p })).toThrow(InputError);
    expect(() => encodeFloatTiff(new Float32Array([1, NaN]), 2, 1)).toThrow(/NaN or infinite/);
    expect(() => encodeFloatTiff(img, 3, 1)).toThrow(RangeError);
  });
});
