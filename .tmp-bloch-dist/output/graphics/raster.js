/**
 * The raster surface: an 8-bit RGB pixel buffer drawn with our own
 * anti-aliased polygon filler (fill.ts); lines and text become polygons
 * first (strokeGeometry.ts, font.ts + flatten.ts). Encoded as PNG by
 * src/output/png.ts.
 */
import { encodeRgbPng } from '../png.js';
import { fillContours } from './fill.js';
import { flattenOutline } from './flatten.js';
import { textAdvance, textOutline } from './font.js';
import { arrowGeometry, counterClockwise, dashPolyline, polylineStroke, rectRing } from './strokeGeometry.js';
const BLACK = [0, 0, 0];
function checkSize(width, height) {
    if (!(Number.isInteger(width) && Number.isInteger(height) && width > 0 && height > 0)) {
        throw new RangeError(`surface size must be positive integers, got ${width} x ${height}`);
    }
}
/** A raster surface of width x height pixels filled with the background colour. */
export function rasterSurface(width, height, background) {
    checkSize(width, height);
    const rgb = new Uint8Array(width * height * 3);
    for (let i = 0; i < rgb.length; i += 3) {
        rgb[i] = background[0];
        rgb[i + 1] = background[1];
        rgb[i + 2] = background[2];
    }
    const fill = (contours, color) => fillContours(rgb, width, height, contours, color);
    const strokePolyline = (points, color, lw, dash) => {
        if (!(lw > 0) || points.length < 4)
            return;
        const pieces = dash && dash.length > 0 ? dashPolyline(points, dash) : [points];
        const polys = [];
        for (const p of pieces)
            for (const q of polylineStroke(p, lw))
                polys.push(q);
        fill(polys, color);
    };
    return {
        width,
        height,
        fillRect(x, y, w, h, color) {
            if (!(w > 0 && h > 0))
                return;
            if ([x, y, w, h].every(Number.isInteger)) {
                // pixel-aligned: exact fill without the scanline machinery
                const x0 = Math.max(0, x), x1 = Math.min(width, x + w);
                const y0 = Math.max(0, y), y1 = Math.min(height, y + h);
                for (let r = y0; r < y1; r++) {
                    for (let c = x0; c < x1; c++) {
                        const p = 3 * (r * width + c);
                        rgb[p] = color[0];
                        rgb[p + 1] = color[1];
                        rgb[p + 2] = color[2];
                    }
                }
                return;
            }
            fill([counterClockwise([x, y, x + w, y, x + w, y + h, x, y + h])], color);
        },
        strokeRect(x, y, w, h, color, lineWidth) {
            if (!(lineWidth > 0))
                return;
            fill(rectRing(x, y, w, h, lineWidth), color);
        },
        line(x0, y0, x1, y1, color, lineWidth, dash) {
            strokePolyline([x0, y0, x1, y1], color, lineWidth, dash);
        },
        polyline(points, color, lineWidth, dash) {
            strokePolyline(points, color, lineWidth, dash);
        },
        polygon(points, color) {
            if (points.length < 6)
                return;
            fill([Array.from(points)], color);
        },
        arrow(x0, y0, x1, y1, color, lineWidth, headLength) {
            const a = arrowGeometry(x0, y0, x1, y1, headLength);
            if (!a)
                return;
            const polys = polylineStroke([x0, y0, a.shaftEnd[0], a.shaftEnd[1]], lineWidth);
            polys.push(a.head);
            fill(polys, color);
        },
        greyImage(pixels, w, h, x, y, drawW, drawH) {
            if (pixels.length !== w * h)
                throw new RangeError(`greyImage: expected ${w * h} bytes for ${w} x ${h}, got ${pixels.length}`);
            if (!(drawW > 0 && drawH > 0))
                return;
            // nearest neighbour: a device pixel takes the source pixel under its centre
            const c0 = Math.max(0, Math.ceil(x - 0.5)), c1 = Math.min(width, Math.ceil(x + drawW - 0.5));
            const r0 = Math.max(0, Math.ceil(y - 0.5)), r1 = Math.min(height, Math.ceil(y + drawH - 0.5));
            for (let r = r0; r < r1; r++) {
                const sy = Math.min(h - 1, Math.floor(((r + 0.5 - y) * h) / drawH));
                for (let c = c0; c < c1; c++) {
                    const sx = Math.min(w - 1, Math.floor(((c + 0.5 - x) * w) / drawW));
                    const v = pixels[sy * w + sx];
                    const p = 3 * (r * width + c);
                    rgb[p] = v;
                    rgb[p + 1] = v;
                    rgb[p + 2] = v;
                }
            }
        },
        text(s, x, y, opts) {
            if (s.length === 0)
                return;
            fill(flattenOutline(textOutline(s, x, y, opts)), opts.color ?? BLACK);
        },
        measureText(s, size, bold) {
            return textAdvance(s, size, bold ?? false);
        },
        toPng() {
            return encodeRgbPng(rgb, width, height);
        },
        pixels() {
            return rgb;
        },
    };
}
