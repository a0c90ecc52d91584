/**
 * PNG encoding (PNG specification, ISO/IEC 15948) checked by decoding with
 * Debian's Python PIL, and the contrast stretch checked against numpy:
 * percentiles by numpy.percentile (methods 'lower'/'higher') and the byte
 * mapping by numpy.rint (round half to even) and numpy.clip.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { autoStretch, encodeGreyPng, encodeRgbPng, stretchToBytes } from '../../src/output/png.js';
import { selectInPlace } from '../../src/output/stretch.js';
import { needPython, pythonText } from '../python.js';

const pil = needPython('PIL', 'numpy');
const numpy = needPython('numpy');
const TMP = fs.mkdtempSync(path.join(os.tmpdir(), 'thinfoil-png-'));
afterAll(() => fs.rmSync(TMP, { recursive: true, force: true }));

const sha256 = (b: Uint8Array): string => createHash('sha256').update(b).digest('hex');

/** Deterministic pseudo-random numbers (LCG, Numerical Recipes constants), for test data only. */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

const PIL_PNG = String.raw`
import hashlib, json, sys
from PIL import Image
Image.open(sys.argv[1]).verify()          # chunk CRCs and structure
im = Image.open(sys.argv[1])
im.load()
print(json.dumps({"mode": im.mode, "size": list(im.size), "format": im.format,
                  "sha256": hashlib.sha256(im.tobytes()).hexdigest()}))
`;

describe('PNG encoders read by Python PIL', () => {

  it('encodeGreyPng: PIL sees an 8-bit grey (mode L) image with the same bytes', (ctx) => {
    pil.require(ctx);
    const w = 131;
    const h = 77;
    const rnd = lcg(7);
    const px = new Uint8Array(w * h).map(() => Math.floor(rnd() * 256));
    const file = path.join(TMP, 'grey.png');
    fs.writeFileSync(file, encodeGreyPng(px, w, h));
    const v = JSON.parse(pythonText(['-c', PIL_PNG, file])) as { mode: string; size: number[]; format: string; sha256: string };
    expect(v).toEqual({ mode: 'L', size: [w, h], format: 'PNG', sha256: sha256(px) });
  });

  it('encodeRgbPng: PIL sees an 8-bit RGB image with the same bytes', (ctx) => {
    pil.require(ctx);
    const w = 64;
    const h = 45;
    const rnd = lcg(11);
    const rgb = new Uint8Array(3 * w * h).map(() => Math.floor(rnd() * 256));
    const file = path.join(TMP, 'rgb.png');
    fs.writeFileSync(file, encodeRgbPng(rgb, w, h));
    const v = JSON.parse(pythonText(['-c', PIL_PNG, file])) as { mode: string; size: number[]; format: string; sha256: string };
    expect(v).toEqual({ mode: 'RGB', size: [w, h], format: 'PNG', sha256: sha256(rgb) });
  });

  it('rejects a buffer of the wrong size', () => {
    expect(() => encodeGreyPng(new Uint8Array(5), 2, 2)).toThrow(RangeError);
    expect(() => encodeRgbPng(new Uint8Array(12), 2, 3)).toThrow(RangeError);
    expect(() => encodeGreyPng(new Uint8Array(0), 0, 0)).toThrow(RangeError);
  });
});

const NUMPY_STRETCH = String.raw`
import json, sys
import numpy as np
a = np.fromfile(sys.argv[1], dtype="<f4")
c = float(sys.argv[2])
lo = float(np.percentile(a, 100 * c, method="lower"))
hi = float(np.percentile(a, 100 * (1 - c), method="higher"))
b = np.clip(np.rint(((a.astype(np.float64) - lo) * 255) / (hi - lo)), 0, 255).astype(np.uint8)
b.tofile(sys.argv[3])
print(json.dumps({"lo": lo, "hi": hi}))
`;

describe('autoStretch and stretchToBytes against numpy', () => {
  it.for([0.005, 0.01, 0.0013])('clipFraction %s: same window and same bytes as numpy', (clip, ctx) => {
    numpy.require(ctx);
    // heavy-tailed data: a smooth background, a few very dark and very bright pixels
    const n = 200_003;
    const rnd = lcg(99);
    const img = new Float32Array(n);
    for (let i = 0; i < n; i++) {
      const u = rnd();
      img[i] = u < 0.002 ? -50 * rnd() : u > 0.997 ? 20 + 100 * rnd() : Math.fround(0.8 + 0.1 * Math.sin(i * 0.01) + 0.05 * rnd());
    }
    const inFile = path.join(TMP, `img-${clip}.f32`);
    const outFile = path.join(TMP, `bytes-${clip}.u8`);
    fs.writeFileSync(inFile, new Uint8Array(img.buffer));
    const ref = JSON.parse(pythonText(['-c', NUMPY_STRETCH, inFile, String(clip), outFile])) as { lo: number; hi: number };
    const win = autoStretch(img, { clipFraction: clip });
    // numpy.percentile 'lower'/'higher': order statistics floor(c (n-1)) and ceil((1-c)(n-1))
    expect(win).toEqual(ref);
    const ours = stretchToBytes(img, win.lo, win.hi);
    expect(sha256(ours)).toBe(sha256(fs.readFileSync(outFile)));
  });

  it('rounds exact halves to even like numpy.rint', (ctx) => {
    numpy.require(ctx);
    // with lo = 0, hi = 510, the value 2k + 1 maps to k + 0.5 exactly
    const img = new Float32Array(512).map((_, i) => i - 1);
    const inFile = path.join(TMP, 'ties.f32');
    const outFile = path.join(TMP, 'ties.u8');
    fs.writeFileSync(inFile, new Uint8Array(img.buffer));
    const script = String.raw`
import sys
import numpy as np
a = np.fromfile(sys.argv[1], dtype="<f4").astype(np.float64)
np.clip(np.rint((a - 0) * 255 / 510), 0, 255).astype(np.uint8).tofile(sys.argv[2])`;
    pythonText(['-c', script, inFile, outFile]);
    const ours = stretchToBytes(img, 0, 510);
    expect(Array.from(ours)).toEqual(Array.from(fs.readFileSync(outFile)));
    expect(ours[2]).toBe(0); // 1 -> 0.5 -> 0 (even)
    expect(ours[4]).toBe(2); // 3 -> 1.5 -> 2 (even)
  });
});

describe('autoStretch fallbacks (never NaN, always lo < hi)', () => {
  it('a uniform image gets a finite window around its value and shows mid grey', () => {
    for (const v of [0, 1, -3.5, 1e30]) {
      const img = new Float32Array(1000).fill(v);
      const { lo, hi } = autoStretch(img);
      expect(Number.isFinite(lo) && Number.isFinite(hi) && lo < hi).toBe(true);
      expect(stretchToBytes(img, lo, hi)[0]).toBe(128); // 127.5 rounds half to even
    }
  });

  it('a flat background with a defect smaller than the clip keeps the defect visible (full range)', () => {
    const img = new Float32Array(10_000).fill(1);
    for (let i = 0; i < 20; i++) img[i * 37] = 0.2; // 0.2 % of the pixels, less than the 0.5 % clip
    expect(autoStretch(img)).toEqual({ lo: Math.fround(0.2), hi: 1 });
  });

  it('a single pixel and clipFraction 0 give the full range', () => {
    expect(autoStretch(new Float32Array([4]))).toEqual({ lo: 2, hi: 6 }); // width max(|v|, 1)
    expect(autoStretch(new Float32Array([3, -1, 8]), { clipFraction: 0 })).toEqual({ lo: -1, hi: 8 });
  });

  it('refuses NaN and infinite pixels, empty images and bad windows', () => {
    expect(() => autoStretch(new Float32Array([1, NaN]))).toThrow(/NaN or infinite/);
    expect(() => autoStretch(new Float32Array([1, Infinity]))).toThrow(/NaN or infinite/);
    expect(() => autoStretch(new Float32Array(0))).toThrow(RangeError);
    expect(() => autoStretch(new Float32Array([1, 2]), { clipFraction: 0.5 })).toThrow(RangeError);
    expect(() => stretchToBytes(new Float32Array([1]), 2, 2)).toThrow(RangeError);
    expect(() => stretchToBytes(new Float32Array([1]), 0, NaN)).toThrow(RangeError);
    expect(() => stretchToBytes(new Float32Array([NaN]), 0, 1)).toThrow(/NaN or infinite/);
  });

  it('selectInPlace agrees with a full sort on data with many ties', () => {
    const rnd = lcg(3);
    for (let trial = 0; trial < 20; trial++) {
      const n = 1 + Math.floor(rnd() * 500);
      const a = new Float32Array(n).map(() => Math.floor(rnd() * 7)); // few distinct values
      const sorted = a.slice().sort();
      const k = Math.floor(rnd() * n);
      expect(selectInPlace(a.slice(), k)).toBe(sorted[k]);
    }
  });
});
