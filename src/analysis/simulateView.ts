/**
 * One candidate's simulation in a micrograph's view: relative contrast
 * I / I_background - 1 of the chosen field, mirrored and blurred as the
 * micrograph settings say, on the crop plus margin.
 *
 * Two ways to the same picture:
 *  - direct: render the view itself (g at the micrograph's angle);
 *  - along the line (straight dislocations): render a square view whose +x
 *    axis is the defect's projected line, so that pixels one step apart along
 *    x see the same displacement field shifted in depth and the renderer's
 *    shared-column path (translation method, src/imaging/translationColumns.ts)
 *    integrates one long column per image row; the micrograph's view is then
 *    sampled from it by bilinear interpolation (a rotation about the beam:
 *    both frames have their origin at the image centre on the entrance
 *    surface, geometry/frames.ts). Used by identification because most views
 *    of an inclined line at an arbitrary screen angle do not fall on a small
 *    pixel step and would be rendered column by column.
 * The point spread (the micrograph's blur plus the pixel's box, variance
 * p^2/12) is applied after either.
 */
import type { Vec3 } from '../math/vec3.js';
import { dot, scale, sub } from '../math/vec3.js';
import { InputError } from '../errors.js';
import type { Scenario } from '../scenario/types.js';
import type { ConditionImages } from '../imaging/renderScenario.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { scenarioFrame } from '../imaging/scenarioFrame.js';
import { flipRowsView, imageView, toFloat64 } from '../imaging/imageView.js';
import type { PreparedMicrograph } from './identifyMicrographs.js';
import { conditionViewAlong, viewAxis } from './identifyView.js';
import { bilinear, gaussianBlur } from './preprocess.js';

/** Renders a scenario (one condition) into its images; the CLI passes renderScenario with one shared pool. */
export type Renderer = (sc: Scenario) => Promise<readonly ConditionImages[]>;

export interface ViewOptions {
  /** Render along the line when the target is a straight dislocation (default true). */
  readonly alongLine?: boolean;
  /** Index of the defect whose line orients the render (default 0). */
  readonly defectIndex?: number;
}

export async function simulateView(vsc: Scenario, m: PreparedMicrograph, render: Renderer, opts: ViewOptions = {}): Promise<Float64Array> {
  const W = m.width + 2 * m.margin;
  const H = m.height + 2 * m.margin;
  // a mirrored micrograph: the view with g at the mirrored angle, flipped top to bottom
  const angle = m.settings.mirrored ? -m.gAngle_deg : m.gAngle_deg;
  const axis = viewAxis(vsc, m.condition, angle);
  const line = opts.alongLine === false ? null : projectedLine(vsc, m, opts.defectIndex ?? 0);
  let rel: Float64Array;
  if (line === null) {
    const imgs = await render(conditionViewAlong(vsc, m.condition, axis, W, H, m.pixel_nm));
    const { src, bg } = fieldOf(imgs[0], m);
    const view = imageView(src, W, H);
    rel = toFloat64(m.settings.mirrored ? flipRowsView(view) : view);
    for (let k = 0; k < rel.length; k++) rel[k] = rel[k] / bg - 1;
  } else {
    const side = Math.ceil(Math.hypot(W, H)) + 4;
    const p = m.pixel_nm;
    const fT = scenarioFrame(vsc, m.condition.beam, axis);
    const fA = scenarioFrame(vsc, m.condition.beam, line);
    const cxx = dot(fT.ex, fA.ex);
    const cxy = dot(fT.ex, fA.ey);
    const cyx = dot(fT.ey, fA.ex);
    const cyy = dot(fT.ey, fA.ey);
    // where each pixel of the view falls in the side x side render along the line (render pixel units)
    const xs = new Float64Array(W * H);
    const ys = new Float64Array(W * H);
    let yLo = Infinity;
    let yHi = -Infinity;
    for (let j = 0; j < H; j++) {
      const jv = m.settings.mirrored ? H - 1 - j : j;
      const Y = (jv + 0.5 - H / 2) * p;
      for (let i = 0; i < W; i++) {
        const X = (i + 0.5 - W / 2) * p;
        const xa = X * cxx + Y * cyx;
        const ya = X * cxy + Y * cyy;
        xs[j * W + i] = xa / p + side / 2 - 0.5;
        ys[j * W + i] = ya / p + side / 2 - 0.5;
        yLo = Math.min(yLo, ys[j * W + i]);
        yHi = Math.max(yHi, ys[j * W + i]);
      }
    }
    // Only the rows the sampling reads are rendered (a row more on each side), the same number dropped at the top and
    // the bottom so that every kept row sits where it was: the rows along the line are classes of their own (one long
    // column each, the same whatever the other rows), so the picture is the same to the last bit, and a view turned
    // little from the line costs a third less. trim - 1 > 0 keeps every sample off the clamped edge rows.
    const trim = Math.max(0, Math.min(Math.floor(yLo) - 1, side - 3 - Math.floor(yHi)));
    const rows = side - 2 * trim;
    const imgs = await render(conditionViewAlong(vsc, m.condition, line, side, rows, p));
    const { src, bg } = fieldOf(imgs[0], m);
    rel = new Float64Array(W * H);
    // ys - trim is exact (an integer subtracted from a non-negative number not smaller than it)
    for (let k = 0; k < W * H; k++) rel[k] = bilinear(src, side, rows, xs[k], ys[k] - trim) / bg - 1;
  }
  // A detector pixel integrates over its area: a box of width p has the variance p^2/12, added here as a
  // Gaussian to the point spread of the microscope (without it, point-sampled simulations are too sharp
  // and the scale search drifts to magnify them).
  const sigma_px = Math.sqrt((m.settings.blur_nm / m.pixel_nm) ** 2 + 1 / 12);
  return gaussianBlur(new Float64Array(W * H), rel, W, H, sigma_px);
}

function fieldOf(ci: ConditionImages, m: PreparedMicrograph): { src: Float32Array; bg: number } {
  const field = m.settings.field;
  const bg = ci.background[field];
  if (!(bg > 1e-9)) {
    throw new InputError(
      `micrographs.${m.conditionId}.field: the perfect crystal gives no ${field === 'df' ? 'dark' : 'bright'}-field intensity under ${m.conditionId} at this thickness, so relative contrast is undefined; compare the ${field === 'df' ? 'bright' : 'dark'}-field micrograph instead`,
    );
  }
  return { src: field === 'bf' ? ci.bf : ci.df, bg };
}

/**
 * The projected line of the target defect (Cartesian, perpendicular to the
 * condition's beam) when the target is a single straight dislocation and the
 * only defect of the scenario, else null (the direct view is used).
 */
function projectedLine(vsc: Scenario, m: PreparedMicrograph, defectIndex: number): Vec3 | null {
  if (vsc.defects.length !== 1) return null;
  const d = vsc.defects[defectIndex];
  if (d === undefined || d.type !== 'dislocation') return null;
  const ez = scenarioFrame(vsc, m.condition.beam).ez;
  const u = directionToCartesian(vsc.material.lattice, d.line);
  const up = sub(u, scale(ez, dot(u, ez)));
  const n = Math.hypot(up[0], up[1], up[2]);
  if (n < 0.05 * Math.hypot(u[0], u[1], u[2])) return null; // nearly end-on: no gain
  return scale(up, 1 / n);
}
