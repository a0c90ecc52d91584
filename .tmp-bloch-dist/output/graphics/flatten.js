/**
 * Flattening of path outlines (lines, quadratic and cubic Bezier segments)
 * into closed polygons, with a bound on the distance between curve and
 * chords. For a Bezier curve B(t) split into n equal parameter steps the
 * chord error is at most max|B''| / (8 n^2) (interpolation error of a linear
 * spline); max|B''| = 2 |P0 - 2 P1 + P2| for a quadratic and
 * 6 max(|P0 - 2 P1 + P2|, |P1 - 2 P2 + P3|) for a cubic.
 */
import { CLOSE, CUBIC, LINE, MOVE, QUAD } from './font.js';
/** Default chord tolerance, px. */
export const FLATTEN_TOLERANCE_PX = 0.05;
/** The closed contours of an outline as x0,y0,x1,y1,... lists. */
export function flattenOutline(o, tol = FLATTEN_TOLERANCE_PX) {
    const out = [];
    let cur = [];
    let px = 0;
    let py = 0;
    let k = 0;
    const finish = () => {
        if (cur.length >= 6)
            out.push(cur);
        cur = [];
    };
    for (const op of o.ops) {
        const c = o.coords;
        switch (op) {
            case MOVE:
                finish();
                px = c[k++];
                py = c[k++];
                cur.push(px, py);
                break;
            case LINE:
                px = c[k++];
                py = c[k++];
                cur.push(px, py);
                break;
            case QUAD: {
                const x1 = c[k++], y1 = c[k++], x2 = c[k++], y2 = c[k++];
                const d = Math.hypot(px - 2 * x1 + x2, py - 2 * y1 + y2);
                const n = Math.min(256, Math.max(1, Math.ceil(Math.sqrt((2 * d) / (8 * tol)))));
                for (let i = 1; i <= n; i++) {
                    const t = i / n;
                    const u = 1 - t;
                    cur.push(u * u * px + 2 * u * t * x1 + t * t * x2, u * u * py + 2 * u * t * y1 + t * t * y2);
                }
                px = x2;
                py = y2;
                break;
            }
            case CUBIC: {
                const x1 = c[k++], y1 = c[k++], x2 = c[k++], y2 = c[k++], x3 = c[k++], y3 = c[k++];
                const d = Math.max(Math.hypot(px - 2 * x1 + x2, py - 2 * y1 + y2), Math.hypot(x1 - 2 * x2 + x3, y1 - 2 * y2 + y3));
                const n = Math.min(256, Math.max(1, Math.ceil(Math.sqrt((6 * d) / (8 * tol)))));
                for (let i = 1; i <= n; i++) {
                    const t = i / n;
                    const u = 1 - t;
                    const a = u * u * u, b = 3 * u * u * t, e = 3 * u * t * t, f = t * t * t;
                    cur.push(a * px + b * x1 + e * x2 + f * x3, a * py + b * y1 + e * y2 + f * y3);
                }
                px = x3;
                py = y3;
                break;
            }
            case CLOSE:
                finish();
                break;
            default:
                throw new RangeError(`flattenOutline: unknown path command ${op}`);
        }
    }
    finish();
    return out;
}
