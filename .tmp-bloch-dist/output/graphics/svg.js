/**
 * The vector surface: an SVG 1.1 document. Text is written as <path>
 * outlines of the bundled font (the same outlines the raster surface fills),
 * so the drawing looks the same on a machine without fonts; grey images are
 * embedded as base64 PNG with pixelated (nearest-neighbour) scaling. Strokes
 * use butt caps and round joins, as the raster surface draws them.
 */
import { encodeGreyPng } from '../png.js';
import { CLOSE, CUBIC, LINE, MOVE, QUAD, textAdvance, textOutline } from './font.js';
import { arrowGeometry } from './strokeGeometry.js';
/** Coordinates to 1/100 px. */
export function fmt(v) {
    if (!Number.isFinite(v))
        throw new RangeError(`svg: non-finite coordinate ${v}`);
    const r = Math.round(v * 100) / 100;
    return Object.is(r, -0) ? '0' : String(r);
}
export function hex(c) {
    return '#' + c.map((v) => Math.max(0, Math.min(255, Math.round(v))).toString(16).padStart(2, '0')).join('');
}
/** Escape text for an XML attribute value. */
export function xmlEscape(s) {
    return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}
function points(p) {
    const out = [];
    for (let i = 0; i + 1 < p.length; i += 2)
        out.push(`${fmt(p[i])},${fmt(p[i + 1])}`);
    return out.join(' ');
}
function dashAttr(dash) {
    return dash && dash.length > 0 ? ` stroke-dasharray="${dash.map(fmt).join(' ')}"` : '';
}
/** Path data of an outline. */
export function outlineToPathData(o) {
    const parts = [];
    let k = 0;
    const c = o.coords;
    const pt = () => `${fmt(c[k++])} ${fmt(c[k++])}`;
    for (const op of o.ops) {
        switch (op) {
            case MOVE:
                parts.push(`M${pt()}`);
                break;
            case LINE:
                parts.push(`L${pt()}`);
                break;
            case QUAD:
                parts.push(`Q${pt()} ${pt()}`);
                break;
            case CUBIC:
                parts.push(`C${pt()} ${pt()} ${pt()}`);
                break;
            case CLOSE:
                parts.push('Z');
                break;
            default:
                throw new RangeError(`svg: unknown path command ${op}`);
        }
    }
    return parts.join('');
}
/** A vector surface of width x height px with the background colour. */
export function svgSurface(width, height, background) {
    if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
        throw new RangeError(`surface size must be positive integers, got ${width} x ${height}`);
    }
    const body = [`<rect x="0" y="0" width="${width}" height="${height}" fill="${hex(background)}"/>`];
    const stroke = (color, lw) => `fill="none" stroke="${hex(color)}" stroke-width="${fmt(lw)}"`;
    return {
        width,
        height,
        fillRect(x, y, w, h, color) {
            if (!(w > 0 && h > 0))
                return;
            body.push(`<rect x="${fmt(x)}" y="${fmt(y)}" width="${fmt(w)}" height="${fmt(h)}" fill="${hex(color)}"/>`);
        },
        strokeRect(x, y, w, h, color, lineWidth) {
            if (!(lineWidth > 0))
                return;
            body.push(`<rect x="${fmt(x)}" y="${fmt(y)}" width="${fmt(w)}" height="${fmt(h)}" ${stroke(color, lineWidth)}/>`);
        },
        line(x0, y0, x1, y1, color, lineWidth, dash) {
            if (!(lineWidth > 0))
                return;
            body.push(`<line x1="${fmt(x0)}" y1="${fmt(y0)}" x2="${fmt(x1)}" y2="${fmt(y1)}" ${stroke(color, lineWidth)} stroke-linecap="butt"${dashAttr(dash)}/>`);
        },
        polyline(p, color, lineWidth, dash) {
            if (!(lineWidth > 0) || p.length < 4)
                return;
            body.push(`<polyline points="${points(p)}" ${stroke(color, lineWidth)} stroke-linecap="butt" stroke-linejoin="round"${dashAttr(dash)}/>`);
        },
        polygon(p, color) {
            if (p.length < 6)
                return;
            body.push(`<polygon points="${points(p)}" fill="${hex(color)}" fill-rule="nonzero"/>`);
        },
        arrow(x0, y0, x1, y1, color, lineWidth, headLength) {
            const a = arrowGeometry(x0, y0, x1, y1, headLength);
            if (!a)
                return;
            body.push(`<g><line x1="${fmt(x0)}" y1="${fmt(y0)}" x2="${fmt(a.shaftEnd[0])}" y2="${fmt(a.shaftEnd[1])}" ${stroke(color, lineWidth)} stroke-linecap="butt"/>` +
                `<polygon points="${points(a.head)}" fill="${hex(color)}"/></g>`);
        },
        greyImage(pixels, w, h, x, y, drawW, drawH) {
            if (pixels.length !== w * h)
                throw new RangeError(`greyImage: expected ${w * h} bytes for ${w} x ${h}, got ${pixels.length}`);
            if (!(drawW > 0 && drawH > 0))
                return;
            const b64 = Buffer.from(encodeGreyPng(pixels, w, h)).toString('base64');
            body.push(`<image x="${fmt(x)}" y="${fmt(y)}" width="${fmt(drawW)}" height="${fmt(drawH)}" preserveAspectRatio="none" ` +
                `image-rendering="optimizeSpeed" style="image-rendering:pixelated" xlink:href="data:image/png;base64,${b64}"/>`);
        },
        text(s, x, y, opts) {
            if (s.length === 0)
                return;
            const d = outlineToPathData(textOutline(s, x, y, opts));
            if (d === '')
                return; // only spaces
            body.push(`<path aria-label="${xmlEscape(s)}" fill="${hex(opts.color ?? [0, 0, 0])}" fill-rule="nonzero" d="${d}"/>`);
        },
        measureText(s, size, bold) {
            return textAdvance(s, size, bold ?? false);
        },
        toSvg() {
            return (`<?xml version="1.0" encoding="UTF-8"?>\n` +
                `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" version="1.1" ` +
                `width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">\n` +
                body.join('\n') +
                `\n</svg>\n`);
        },
    };
}
