/**
 * Text as glyph outlines from the DejaVu Sans fonts shipped through npm
 * (dejavu-fonts-ttf), parsed with opentype.js. Layout is our own: one glyph
 * per code point from the font's cmap, advance widths from hmtx and pair
 * kerning from the font's GPOS table (opentype.js' own string shaping is not
 * used: its contextual substitution stage rejects these fonts). No
 * ligatures, no bidirectional text: labels are short left-to-right strings.
 *
 * Outlines are returned in page pixels (y down) as path commands that both
 * surfaces consume: the raster surface flattens and fills them, the SVG
 * surface writes them as <path d>. Glyph outlines are cached per font.
 */
import { createRequire } from 'node:module';
import { readFileSync } from 'node:fs';
/** Path command codes of an Outline. */
export const MOVE = 0;
export const LINE = 1;
export const QUAD = 2;
export const CUBIC = 3;
export const CLOSE = 4;
const FONT_FILES = {
    regular: 'dejavu-fonts-ttf/ttf/DejaVuSans.ttf',
    bold: 'dejavu-fonts-ttf/ttf/DejaVuSans-Bold.ttf',
};
const require = createRequire(import.meta.url);
let opentype = null;
const faces = {};
/** Path of the bundled font file (regular or bold). */
export function fontFile(bold = false) {
    return require.resolve(bold ? FONT_FILES.bold : FONT_FILES.regular);
}
/** The regular or bold face, loaded on first use. */
export function face(bold = false) {
    const key = bold ? 'bold' : 'regular';
    const cached = faces[key];
    if (cached)
        return cached;
    opentype ??= require('opentype.js');
    const bytes = readFileSync(fontFile(bold));
    const font = opentype.parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength));
    const h = font.charToGlyph('H').getPath(0, 0, font.unitsPerEm).commands;
    let top = 0;
    for (const c of h)
        if (c.type !== 'Z')
            top = Math.min(top, c.y);
    let kerning = null;
    try {
        // the Latin script's kerning (the script HarfBuzz picks for Latin text; DejaVu's default script has none)
        kerning = font.position.getKerningTables('latn') ?? null;
    }
    catch {
        kerning = null;
    }
    const f = {
        font,
        unitsPerEm: font.unitsPerEm,
        ascender: font.ascender,
        descender: font.descender,
        capHeight: -top,
        kerning,
        glyphs: new Map(),
    };
    faces[key] = f;
    return f;
}
/** The glyph of one character, its outline in font units (y down, origin on the baseline). */
function glyphOutline(f, g) {
    const hit = f.glyphs.get(g.index);
    if (hit)
        return hit;
    const ops = [];
    const coords = [];
    for (const c of g.getPath(0, 0, f.unitsPerEm).commands) {
        switch (c.type) {
            case 'M':
                ops.push(MOVE);
                coords.push(c.x, c.y);
                break;
            case 'L':
                ops.push(LINE);
                coords.push(c.x, c.y);
                break;
            case 'Q':
                ops.push(QUAD);
                coords.push(c.x1, c.y1, c.x, c.y);
                break;
            case 'C':
                ops.push(CUBIC);
                coords.push(c.x1, c.y1, c.x2, c.y2, c.x, c.y);
                break;
            case 'Z':
                ops.push(CLOSE);
                break;
        }
    }
    const o = { ops, coords };
    f.glyphs.set(g.index, o);
    return o;
}
function kern(f, left, right) {
    if (f.kerning)
        return f.font.position.getKerningValue(f.kerning, left, right) || 0;
    return f.font.getKerningValue(left, right) || 0;
}
/** Glyphs of s with their pen positions (font units from the start of the text) and the total advance. */
export function layoutText(s, bold = false) {
    const f = face(bold);
    const glyphs = [];
    let x = 0;
    let prev = null;
    for (const ch of s) {
        const g = f.font.charToGlyph(ch);
        if (prev)
            x += kern(f, prev.index, g.index);
        glyphs.push({ glyph: g, x });
        x += g.advanceWidth ?? 0;
        prev = g;
    }
    return { glyphs, advance: x, face: f };
}
/** Advance width of s at size px (kerning included). */
export function textAdvance(s, size, bold = false) {
    const { advance, face: f } = layoutText(s, bold);
    return (advance * size) / f.unitsPerEm;
}
/**
 * The outline of s placed on the page: (x, y) is the anchor point, the text
 * rotated about it counter-clockwise by rotate_deg as seen on the page.
 */
export function textOutline(s, x, y, opts) {
    const size = opts.size;
    if (!(Number.isFinite(size) && size > 0))
        throw new RangeError(`text size must be a positive number of px, got ${size}`);
    const lay = layoutText(s, opts.bold ?? false);
    const f = lay.face;
    const k = size / f.unitsPerEm;
    const anchor = opts.anchor ?? 'start';
    const dx = anchor === 'start' ? 0 : anchor === 'middle' ? -lay.advance / 2 : -lay.advance;
    const base = opts.baseline ?? 'alphabetic';
    const dy = base === 'alphabetic' ? 0 : base === 'middle' ? f.capHeight / 2 : f.ascender;
    const a = ((opts.rotate_deg ?? 0) * Math.PI) / 180;
    // page rotation counter-clockwise with y down: (u, v) -> (u cos a + v sin a, -u sin a + v cos a)
    const c = Math.cos(a);
    const sn = Math.sin(a);
    const ops = [];
    const coords = [];
    for (const { glyph, x: gx } of lay.glyphs) {
        const o = glyphOutline(f, glyph);
        for (const op of o.ops)
            ops.push(op);
        const src = o.coords;
        for (let i = 0; i < src.length; i += 2) {
            const u = (src[i] + gx + dx) * k;
            const v = (src[i + 1] + dy) * k;
            coords.push(x + u * c + v * sn, y - u * sn + v * c);
        }
    }
    return { ops, coords };
}
