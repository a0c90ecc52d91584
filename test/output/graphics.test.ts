/**
 * The drawing library (src/output/graphics): the anti-aliased polygon
 * filler against exact geometry, text against the font's own metrics
 * (opentype.js reading DejaVu Sans, and FreeType/HarfBuzz through Debian's
 * python3-pil as an independent text engine), PNG decoding with pngjs, and
 * SVG well-formedness with Python's xml.etree.
 */
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import pngjs from 'pngjs';
import { rasterSurface } from '../../src/output/graphics/raster.js';
import { svgSurface } from '../../src/output/graphics/svg.js';
import { scanCoverage, SUBSCANLINES } from '../../src/output/graphics/fill.js';
import { fontFile, textAdvance } from '../../src/output/graphics/font.js';
import { dashPolyline, discPolygon, polylineStroke, signedArea } from '../../src/output/graphics/strokeGeometry.js';
import { needPython, needPythonFeature, runPython } from '../python.js';
import type { RGB } from '../../src/output/graphics/types.js';

const WHITE: RGB = [255, 255, 255];
const BLACK: RGB = [0, 0, 0];

// opentype.js, read directly (the reference for glyph metrics); it ships no type declarations
interface OtGlyph {
  index: number;
  advanceWidth: number;
  getBoundingBox(): { x1: number; y1: number; x2: number; y2: number };
}
interface OtFont {
  unitsPerEm: number;
  charToGlyph(c: string): OtGlyph;
  getAdvanceWidth(s: string, size: number): number;
  position: { getKerningTables(script: string): unknown; getKerningValue(t: unknown, a: number, b: number): number };
}
const require = createRequire(import.meta.url);
const opentype = require('opentype.js') as { parse(b: ArrayBuffer): OtFont };
const fontBytes = readFileSync(fontFile(false));
const FONT = opentype.parse(fontBytes.buffer.slice(fontBytes.byteOffset, fontBytes.byteOffset + fontBytes.byteLength) as ArrayBuffer);
/** Pair kerning from the font's GPOS table for the Latin script (the script HarfBuzz picks for Latin text), read by opentype.js. */
const LATN = FONT.position.getKerningTables('latn');
const kernUnits = (a: OtGlyph, b: OtGlyph) => FONT.position.getKerningValue(LATN, a.index, b.index);

const PIL_TEXT = ['PIL.ImageFont', 'PIL.features', 'PIL.ImageDraw'];
const pil = needPython(...PIL_TEXT);
const raqm = needPythonFeature(PIL_TEXT, {
  code: "import sys\nfrom PIL import features\nsys.exit(0 if features.check('raqm') else 1)",
  packages: ['libraqm0'],
  what: "python3-pil has no raqm text layout (Debian's libraqm0)",
});
const xml = needPython('xml.etree.ElementTree');

/** Ink (darkness 0..1 per pixel, mean over R, G, B) of a white-background surface. */
function ink(px: Uint8Array, width: number, height: number): Float64Array {
  const out = new Float64Array(width * height);
  for (let i = 0; i < width * height; i++) out[i] = 1 - (px[3 * i] + px[3 * i + 1] + px[3 * i + 2]) / (3 * 255);
  return out;
}

/** Bounding box [x0, y0, x1, y1) of pixels with ink above the threshold. */
function inkBox(a: Float64Array, width: number, height: number, threshold = 0.02): [number, number, number, number] {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (a[y * width + x] > threshold) {
        x0 = Math.min(x0, x);
        y0 = Math.min(y0, y);
        x1 = Math.max(x1, x + 1);
        y1 = Math.max(y1, y + 1);
      }
    }
  }
  return [x0, y0, x1, y1];
}

/** Reference bounding box of s drawn at (x, y) baseline, from opentype's per-glyph boxes and advances/kerning. */
function opentypeBox(s: string, x: number, y: number, size: number): [number, number, number, number] {
  const k = size / FONT.unitsPerEm;
  let pen = 0;
  let bx0 = Infinity, by0 = Infinity, bx1 = -Infinity, by1 = -Infinity;
  const glyphs = [...s].map((c) => FONT.charToGlyph(c));
  glyphs.forEach((g, i) => {
    const b = g.getBoundingBox(); // font units, y up
    if (b.x2 > b.x1) {
      bx0 = Math.min(bx0, pen + b.x1);
      bx1 = Math.max(bx1, pen + b.x2);
      by0 = Math.min(by0, -b.y2);
      by1 = Math.max(by1, -b.y1);
    }
    pen += g.advanceWidth;
    if (i + 1 < glyphs.length) pen += kernUnits(g, glyphs[i + 1]);
  });
  return [x + bx0 * k, y + by0 * k, x + bx1 * k, y + by1 * k];
}

describe('raster surface and PNG', () => {
  it('encodes a PNG that pngjs decodes to the right size and the same pixels', () => {
    const s = rasterSurface(37, 23, [10, 20, 30]);
    s.fillRect(5, 4, 10, 6, [200, 100, 50]);
    s.line(0, 0, 36, 22, [0, 128, 255], 1.5);
    const png = pngjs.PNG.sync.read(Buffer.from(s.toPng()));
    expect([png.width, png.height]).toEqual([37, 23]);
    const rgb = s.pixels();
    let diff = 0;
    for (let i = 0; i < 37 * 23; i++) for (let c = 0; c < 3; c++) diff += Math.abs(png.data[4 * i + c] - rgb[3 * i + c]);
    expect(diff).toBe(0);
    // background untouched far from the drawing, rectangle colour inside it
    expect(Array.from(rgb.subarray(3 * (22 * 37 + 0), 3 * (22 * 37 + 0) + 3))).toEqual([10, 20, 30]);
    expect(Array.from(rgb.subarray(3 * (8 * 37 + 6), 3 * (8 * 37 + 6) + 3))).toEqual([200, 100, 50]);
  });

  it('greyImage scales with nearest neighbour (each source pixel becomes a 10 x 10 block)', () => {
    const s = rasterSurface(30, 30, WHITE);
    s.greyImage(Uint8Array.from([0, 60, 120, 240]), 2, 2, 5, 5, 20, 20);
    const px = s.pixels();
    const at = (x: number, y: number) => px[3 * (y * 30 + x)];
    expect([at(5, 5), at(14, 14), at(15, 5), at(24, 14), at(5, 15), at(14, 24), at(15, 15), at(24, 24)]).toEqual([
      0, 0, 60, 60, 120, 120, 240, 240,
    ]);
    expect([at(4, 4), at(25, 25)]).toEqual([255, 255]);
  });
});

describe('anti-aliased polygon filling (geometry)', () => {
  it('a disc of radius r as a 720-gon has ink area within 1 % of pi r^2', () => {
    const r = 23.7;
    const poly = discPolygon(40.3, 39.6, r, 720);
    const s = rasterSurface(80, 80, WHITE);
    s.polygon(poly, BLACK);
    const a = ink(s.pixels(), 80, 80);
    const area = a.reduce((p, q) => p + q, 0);
    // the area of a circle, pi r^2 (geometry); the 720-gon differs by 1.3e-5 relative
    expect(Math.abs(area / (Math.PI * r * r) - 1)).toBeLessThan(0.01);
    // measured: much tighter than 1 %, against the polygon's exact (shoelace) area; 8-bit rounding
    // of the edge pixels (+-0.5/255 each over ~300 pixels) and the sampling in y bound it
    expect(Math.abs(area - Math.abs(signedArea(poly)))).toBeLessThan(0.5);
  });

  it('coverage sums to the polygon area before 8-bit rounding (non-convex, with a hole)', () => {
    // a square with a square hole (opposite orientation), non-zero winding: area 20^2 - 8^2
    const outer = [10.2, 10.7, 30.2, 10.7, 30.2, 30.7, 10.2, 30.7];
    const hole = [14.5, 14.25, 14.5, 22.25, 22.5, 22.25, 22.5, 14.25];
    let sum = 0;
    scanCoverage([outer, hole], { x0: 0, y0: 0, x1: 64, y1: 64 }, (_r, x0, x1, cov) => {
      for (let x = x0; x < x1; x++) sum += Math.min(1, cov[x - x0]);
    });
    expect(sum).toBeCloseTo(400 - 64, 9);
  });

  it('a half-plane edge through the middle of a pixel column or row gives 50 % grey', () => {
    const s = rasterSurface(40, 40, WHITE);
    s.polygon([10.5, -5, 60, -5, 60, 45, 10.5, 45], BLACK); // x >= 10.5
    const px = s.pixels();
    const v = (x: number, y: number) => px[3 * (y * 40 + x)];
    expect(v(9, 20)).toBe(255);
    expect(Math.abs(v(10, 20) - 127.5)).toBeLessThanOrEqual(0.5); // 255 (1 - 0.5), rounded
    expect(v(11, 20)).toBe(0);
    const t = rasterSurface(40, 40, WHITE);
    t.polygon([-5, 20.5, 45, 20.5, 45, 45, -5, 45], BLACK); // y >= 20.5, sampled by the sub-scanlines
    const q = t.pixels();
    expect(q[3 * (19 * 40 + 7)]).toBe(255);
    expect(Math.abs(q[3 * (20 * 40 + 7)] - 127.5)).toBeLessThanOrEqual(0.5);
    expect(q[3 * (21 * 40 + 7)]).toBe(0);
  });

  it('a slanted edge gives each pixel its exact covered area within the sub-scanline error', () => {
    // half-plane y >= 0.3 x + 5.2 ; exact area of the unit pixel [x, x+1] x [y, y+1] below the line
    const line = (x: number) => 0.3 * x + 5.2;
    const s = rasterSurface(30, 20, WHITE);
    s.polygon([0, line(0), 30, line(30), 30, 40, 0, 40], BLACK);
    const a = ink(s.pixels(), 30, 20);
    const exact = (x: number, y: number) => {
      // integrate the clipped height of the inside part over the pixel (line is straight: midpoint rule exact
      // when the line does not leave the pixel row; fine numeric integration otherwise)
      let acc = 0;
      const n = 2000;
      for (let i = 0; i < n; i++) {
        const yl = line(x + (i + 0.5) / n);
        acc += Math.min(1, Math.max(0, y + 1 - yl));
      }
      return acc / n;
    };
    let worst = 0;
    for (let x = 0; x < 30; x++) for (let y = 0; y < 20; y++) worst = Math.max(worst, Math.abs(a[y * 30 + x] - exact(x, y)));
    // sampling 16 lines per row errs by at most 1/16 of the edge's horizontal run per line: 0.3 / 16 ... plus 8-bit rounding
    expect(worst).toBeLessThan(1 / SUBSCANLINES + 1 / 255);
  });

  it('a polyline covers its length times its width (joins fill the outer wedge once)', () => {
    // an L-shaped path: two 30 px legs, width 4; area = 2 * 30 * 4 - 4 * 2 (overlap of the legs at the corner, inner
    // side) + the quarter disc of radius 2 (round join, outer side)
    const polys = polylineStroke([10, 10, 40, 10, 40, 40], 4);
    let sum = 0;
    scanCoverage(polys, { x0: 0, y0: 0, x1: 64, y1: 64 }, (_r, x0, x1, cov) => {
      for (let x = x0; x < x1; x++) sum += Math.min(1, cov[x - x0]);
    });
    const expected = 2 * 30 * 4 - 2 * 2 + (Math.PI * 2 * 2) / 4;
    expect(Math.abs(sum - expected)).toBeLessThan(0.05);
  });

  it('dashes follow the pattern along the path length', () => {
    const pieces = dashPolyline([0, 0, 10, 0, 10, 10], [3, 2]);
    const lengths = pieces.map((p) => {
      let l = 0;
      for (let i = 0; i + 3 < p.length; i += 2) l += Math.hypot(p[i + 2] - p[i], p[i + 3] - p[i + 1]);
      return l;
    });
    // total 20 px: on 0-3, 5-8, 10-13 (turning the corner), 15-18
    expect(lengths.map((l) => Number(l.toFixed(9)))).toEqual([3, 3, 3, 3]);
    expect(pieces[2]).toEqual([10, 0, 10, 3]);
  });
});

describe('text from the bundled font', () => {
  const SIZE = 40;

  it('measureText equals the advance widths and kerning that opentype.js reads from the font', () => {
    const s = rasterSurface(10, 10, WHITE);
    for (const str of ['Hello', 'AVAT To', '\u03be\u03b1\u03b2\u03b3 \u00b7 \u2212 \u207b\u00b9', 'x/d 0.25']) {
      const glyphs = [...str].map((c) => FONT.charToGlyph(c));
      let units = 0;
      glyphs.forEach((g, i) => {
        units += g.advanceWidth;
        if (i + 1 < glyphs.length) units += kernUnits(g, glyphs[i + 1]);
      });
      expect(s.measureText(str, SIZE)).toBeCloseTo((units * SIZE) / FONT.unitsPerEm, 9);
    }
    // single characters through opentype's own layout function
    for (const c of ['H', '\u03be', '\u2212']) expect(textAdvance(c, SIZE)).toBeCloseTo(FONT.getAdvanceWidth(c, SIZE), 9);
  });

  it('measureText agrees with FreeType + HarfBuzz (python3-pil, raqm layout, ligatures off)', (ctx) => {
    raqm.require(ctx);
    const strs = ['Hello', 'AVAT To', '\u03be\u03b1\u03b2\u03b3', 's (nm\u207b\u00b9)'];
    const script = String.raw`
import json, sys
from PIL import ImageFont
f = ImageFont.truetype(sys.argv[1], 2048, layout_engine=ImageFont.Layout.RAQM)
print(json.dumps({"w": [f.getlength(s, features=['-liga']) for s in json.loads(sys.argv[2])]}))
`;
    const out = JSON.parse(runPython(['-c', script, fontFile(false), JSON.stringify(strs)]).stdout) as { w: number[] };
    // at 2048 px per em (= units per em of DejaVu Sans) FreeType's advances are the font units themselves
    strs.forEach((s, i) => expect(textAdvance(s, 2048)).toBeCloseTo(out.w[i], 6));
  });

  it('the ink of "Hello" matches the font outline bounding box within 1 px', () => {
    const W = 200, H = 80;
    const x = 20.3, y = 60;
    const s = rasterSurface(W, H, WHITE);
    s.text('Hello', x, y, { size: SIZE });
    const got = inkBox(ink(s.pixels(), W, H), W, H);
    const ref = opentypeBox('Hello', x, y, SIZE);
    // a pixel counts as inked above 2 % coverage: the ink box is the font box widened to whole pixels
    expect(Math.abs(got[0] - ref[0])).toBeLessThanOrEqual(1);
    expect(Math.abs(got[1] - ref[1])).toBeLessThanOrEqual(1);
    expect(Math.abs(got[2] - ref[2])).toBeLessThanOrEqual(1);
    expect(Math.abs(got[3] - ref[3])).toBeLessThanOrEqual(1);
  });

  it('Greek letters and symbols put ink where the font says (xi, alpha, beta, gamma, middle dot, minus)', () => {
    const W = 300, H = 80;
    const str = '\u03be\u03b1\u03b2\u03b3\u00b7\u2212';
    const s = rasterSurface(W, H, WHITE);
    s.text(str, 10, 55, { size: SIZE });
    const got = inkBox(ink(s.pixels(), W, H), W, H);
    const ref = opentypeBox(str, 10, 55, SIZE);
    for (let i = 0; i < 4; i++) expect(Math.abs(got[i] - ref[i])).toBeLessThanOrEqual(1);
    // each of the six glyphs has its own outline (none is the empty .notdef)
    for (const c of str) expect(FONT.charToGlyph(c).index).toBeGreaterThan(0);
  });

  it('the ink box agrees with FreeType rendering the same text (python3-pil)', (ctx) => {
    pil.require(ctx);
    const W = 200, H = 80;
    const s = rasterSurface(W, H, WHITE);
    s.text('Hello', 20, 60, { size: SIZE });
    const got = inkBox(ink(s.pixels(), W, H), W, H);
    // FreeType draws the same string into a grey image (its own rasteriser, with hinting at 40 px, which may
    // move an edge by up to about half a pixel); the ink box uses the same 2 % threshold
    const script = String.raw`
import json, sys
from PIL import Image, ImageDraw, ImageFont
f = ImageFont.truetype(sys.argv[1], 40)
im = Image.new('L', (200, 80), 255)
ImageDraw.Draw(im).text((20, 60), 'Hello', font=f, fill=0, anchor='ls')
px = im.load()
ink = [(x, y) for y in range(80) for x in range(200) if 1 - px[x, y] / 255 > 0.02]
xs = [p[0] for p in ink]; ys = [p[1] for p in ink]
print(json.dumps([min(xs), min(ys), max(xs) + 1, max(ys) + 1]))
`;
    const ref = JSON.parse(runPython(['-c', script, fontFile(false)]).stdout) as number[];
    for (let i = 0; i < 4; i++) expect(Math.abs(got[i] - ref[i])).toBeLessThanOrEqual(1);
  });

  it('anchor, baseline and rotation place the text as documented', () => {
    const W = 200, H = 200;
    const adv = textAdvance('Hello', SIZE);
    const mid = rasterSurface(W, H, WHITE);
    mid.text('Hello', 100, 100, { size: SIZE, anchor: 'middle' });
    const start = rasterSurface(W, H, WHITE);
    start.text('Hello', 100 - adv / 2, 100, { size: SIZE });
    expect(inkBox(ink(mid.pixels(), W, H), W, H)).toEqual(inkBox(ink(start.pixels(), W, H), W, H));
    // rotated by 90 degrees counter-clockwise about the anchor: reads bottom to top, left of... the ink lies above (x, y)
    const rot = rasterSurface(W, H, WHITE);
    rot.text('Hello', 100, 180, { size: SIZE, rotate_deg: 90 });
    const b = inkBox(ink(rot.pixels(), W, H), W, H);
    const ref = opentypeBox('Hello', 0, 0, SIZE); // unrotated, relative to the anchor
    // rotation maps (u, v) -> (v, -u): x range = v range, y range = -u range
    expect(Math.abs(b[0] - (100 + ref[1]))).toBeLessThanOrEqual(1);
    expect(Math.abs(b[2] - (100 + ref[3]))).toBeLessThanOrEqual(1);
    expect(Math.abs(b[1] - (180 - ref[2]))).toBeLessThanOrEqual(1);
    expect(Math.abs(b[3] - (180 - ref[0]))).toBeLessThanOrEqual(1);
  });
});

describe('SVG surface', () => {
  function sample(): string {
    const s = svgSurface(120, 90, WHITE);
    s.fillRect(1, 2, 30, 20, [250, 10, 10]);
    s.strokeRect(5.5, 5.5, 50, 40, [0, 0, 0], 1);
    s.line(0, 0, 100, 80, [0, 0, 255], 2, [4, 2]);
    s.polyline([1, 1, 20, 30, 40, 10], [0, 120, 0], 1.5);
    s.polygon([60, 60, 80, 60, 70, 80], [128, 0, 128]);
    s.arrow(10, 80, 60, 70, [0, 0, 0], 1, 8);
    s.greyImage(Uint8Array.from([0, 255, 128, 64]), 2, 2, 90, 10, 20, 20);
    s.text('Hello <\u03be> & "\u03b1"', 10, 50, { size: 12 });
    s.text('y label', 110, 60, { size: 10, rotate_deg: 90, anchor: 'middle', bold: true });
    return s.toSvg();
  }

  it('is well-formed XML (Python xml.etree) with no <text> elements and text as paths', (ctx) => {
    const svg = sample();
    expect(svg).not.toMatch(/<text[\s>]/);
    expect(svg).toMatch(/<path aria-label="Hello &lt;\u03be&gt; &amp; &quot;\u03b1&quot;"/);
    expect(svg).toMatch(/image-rendering:pixelated/);
    expect(svg).toMatch(/xlink:href="data:image\/png;base64,/);
    const script = String.raw`
import sys, json, xml.etree.ElementTree as ET
root = ET.fromstring(sys.stdin.read())
ns = '{http://www.w3.org/2000/svg}'
tags = [e.tag.replace(ns, '') for e in root.iter()]
print(json.dumps({"root": root.tag, "w": root.get('width'), "tags": sorted(set(tags)), "text": tags.count('text')}))
`;
    xml.require(ctx);
    const r = JSON.parse(runPython(['-c', script], svg).stdout) as { root: string; w: string; tags: string[]; text: number };
    expect(r.root).toBe('{http://www.w3.org/2000/svg}svg');
    expect(r.w).toBe('120');
    expect(r.text).toBe(0);
    expect(r.tags).toEqual(expect.arrayContaining(['svg', 'rect', 'line', 'polyline', 'polygon', 'image', 'path', 'g']));
  });

  it('writes the embedded image as a PNG that decodes to the source pixels', () => {
    const m = /base64,([A-Za-z0-9+/=]+)"/.exec(sample());
    expect(m).not.toBeNull();
    const png = pngjs.PNG.sync.read(Buffer.from(m![1], 'base64'));
    expect([png.width, png.height]).toEqual([2, 2]);
    expect([png.data[0], png.data[4], png.data[8], png.data[12]]).toEqual([0, 255, 128, 64]);
  });
});
