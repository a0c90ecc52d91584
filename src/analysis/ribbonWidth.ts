/**
 * True width of a dissociated dislocation from the separation of its two
 * weak-beam peaks. Each partial's weak-beam image lies beside its core, on a
 * side set by the sign of g.b_p and s (Cockayne, Ray & Whelan 1969), so the
 * peak separation differs from the projected partial separation. The
 * correction is by simulation: strips of columns across the ribbon are
 * computed with thinfoil's column evaluator (the condition's beams, two-beam
 * or systematic row) for ribbons of several widths W (the dissociated
 * defect's separation_nm), each smoothed like the micrograph profile (a box
 * of the bin width, optional Gaussian blur), and the W whose simulated peak
 * separation equals the measured one is found by bracketing and bisection.
 * Its uncertainty is the measured separation's divided by the slope
 * d(separation)/dW there.
 *
 * The ribbon centre is the defect's point_nm; the strip runs through its
 * image across the projected line, in the condition's own frame.
 */
import type { Vec3 } from '../math/vec3.js';
import { dot } from '../math/vec3.js';
import { directionToCartesian } from '../crystal/lattice.js';
import { InputError, InternalError } from '../errors.js';
import type { Scenario } from '../scenario/types.js';
import type { DissociatedSpec } from '../defects/dissociated.js';
import { dissociationPair, dissociationWidth_nm } from '../defects/dissociated.js';
import { crystalToImagePoint, imagePointToCrystal } from '../geometry/frames.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { resolveCondition, type ResolvedCondition } from '../imaging/resolveCondition.js';
import { renderJob } from '../imaging/renderScenario.js';
import { columnEvaluator } from '../imaging/renderRows.js';
import { coreGeometry } from '../imaging/cores.js';
import { gaussianSmooth1d, removeBackground, twoPeaks } from './ribbonProfile.js';

export interface RibbonTarget {
  readonly sc: Scenario;
  readonly conditionIndex: number;
  readonly defectIndex: number;
}

export interface StripOptions {
  /** Bin width of the measured profile (nm): the simulated strip is averaged over the same width. */
  readonly binWidth_nm: number;
  /** Gaussian point spread (standard deviation, nm) applied to the simulated strip (default 0). */
  readonly blur_nm?: number;
  /** "df" (weak beam: bright peaks; default) or "bf" (dark peaks: the profile is negated). */
  readonly field?: 'df' | 'bf';
  /** Half-length of the strip across the line (nm). */
  readonly halfWidth_nm: number;
  /** Standard deviation (nm) of the smooth background removed before the peaks are picked (removeBackground; 0: none). */
  readonly background_nm?: number;
  /** Only peaks within this distance of the ribbon centre count (default: the whole strip). */
  readonly window_nm?: number;
}

/** The dissociated defect of a target, or InputError naming --defect. */
export function ribbonDefect(t: RibbonTarget): DissociatedSpec {
  const d = t.sc.defects[t.defectIndex];
  if (d === undefined) throw new InputError(`--defect ${t.defectIndex} names no defect; the scenario has defects 0..${t.sc.defects.length - 1}`);
  if (d.type !== 'dissociated') throw new InputError(`--defect ${t.defectIndex}: defects[${t.defectIndex}] is a "${d.type}"; the ribbon width needs a "dissociated" defect (b, plane, line, point_nm)`);
  return d;
}

/** Geometry of the ribbon in the condition's image: centre, unit normal of the projected line, and the projection factor of the ribbon. */
export function ribbonStripGeometry(t: RibbonTarget): { c: ResolvedCondition; x0: number; y0: number; across: [number, number]; lineAngle_deg: number; projection: number } {
  const sc = t.sc;
  const d = ribbonDefect(t);
  const c = resolveCondition(sc, sc.conditions[t.conditionIndex]);
  const centre = imagePointToCrystal(referenceFrame(sc), d.point_nm);
  const [x0, y0] = crystalToImagePoint(c.frame, centre);
  const u = directionToCartesian(sc.material.lattice, d.line);
  const ux = dot(u, c.frame.ex), uy = dot(u, c.frame.ey);
  const ul = Math.hypot(ux, uy);
  if (ul < 1e-6 * Math.hypot(...u)) throw new InputError(`defects[${t.defectIndex}].line runs along the beam of condition "${c.id}" (seen end-on), so no profile across it exists; choose another condition`);
  // the line turned 90 degrees counter-clockwise on the screen (+y down), as in ribbonProfile.ts
  const across: [number, number] = [uy / ul, -ux / ul];
  const pair = dissociationPair(sc.material, d);
  const r = pair.ribbonDirection;
  const projection = Math.abs(dot(r, c.frame.ex) * across[0] + dot(r, c.frame.ey) * across[1]);
  // screen angle of the line: counter-clockwise from +x with +y down
  const lineAngle_deg = (Math.atan2(-uy, ux) * 180) / Math.PI;
  return { c, x0, y0, across, lineAngle_deg, projection };
}

/** The scenario with the target's ribbon width set to width_nm. */
function withWidth(t: RibbonTarget, width_nm: number): Scenario {
  const d = ribbonDefect(t);
  return { ...t.sc, defects: t.sc.defects.map((x, i) => (i === t.defectIndex ? { ...d, separation_nm: width_nm } : x)) };
}

export interface SimulatedStrip {
  readonly x_nm: Float64Array;
  /** Intensity (fraction of the incident beam), smoothed like the measured profile; negated for "bf". */
  readonly y: Float64Array;
}

/** Simulated strip across the ribbon of the given width (only the target defect; other defects are left out). */
export function simulatedStrip(t: RibbonTarget, width_nm: number, o: StripOptions): SimulatedStrip {
  const g = ribbonStripGeometry(t);
  const only = withWidth(t, width_nm);
  const sc: Scenario = { ...only, defects: [only.defects[t.defectIndex]] };
  const job = renderJob(sc, g.c);
  const ev = columnEvaluator(job);
  const cores = coreGeometry(job);
  const step = Math.min(0.05, o.binWidth_nm / 4);
  const n = 2 * Math.ceil(o.halfWidth_nm / step) + 1;
  const x = new Float64Array(n);
  const raw = new Float64Array(n);
  const out = new Float64Array(64);
  const esc = new Float64Array(4);
  const df = (o.field ?? 'df') === 'df';
  const intensity = (px: number, py: number) => {
    ev.column(out, px, py);
    return df ? out[2] * out[2] + out[3] * out[3] : out[0] * out[0] + out[1] * out[1];
  };
  for (let k = 0; k < n; k++) {
    const tt = (k - (n - 1) / 2) * step;
    x[k] = tt;
    const px = g.x0 + tt * g.across[0];
    const py = g.y0 + tt * g.across[1];
    let v: number;
    if (cores !== null && cores.near(px, py, 0)) {
      // as the renderer does for a pixel reaching a core: the two columns just outside it
      cores.escape(esc, px, py);
      v = 0.5 * (intensity(esc[0], esc[1]) + intensity(esc[2], esc[3]));
    } else v = intensity(px, py);
    raw[k] = df ? v : -v;
  }
  if (raw.some((v) => !Number.isFinite(v))) throw new InternalError('simulated ribbon strip has a non-finite intensity');
  // the measured profile averages each bin over its width: a box of the bin width; then the optional blur
  let y = boxSmooth(raw, Math.max(1, Math.round(o.binWidth_nm / step)));
  if ((o.blur_nm ?? 0) > 0) y = gaussianSmooth1d(y, (o.blur_nm as number) / step);
  return { x_nm: x, y };
}

function boxSmooth(v: Float64Array, w: number): Float64Array {
  if (w <= 1) return v;
  const out = new Float64Array(v.length);
  const h = (w - 1) / 2;
  for (let k = 0; k < v.length; k++) {
    let s = 0, c = 0;
    for (let j = Math.ceil(k - h); j <= Math.floor(k + h); j++) if (j >= 0 && j < v.length) { s += v[j]; c++; }
    out[k] = s / c;
  }
  return out;
}

/** Peak separation (nm) of the simulated strip for a ribbon width, or null when the two peaks are not resolved. */
export function simulatedSeparation(t: RibbonTarget, width_nm: number, o: StripOptions): number | null {
  const s = simulatedStrip(t, width_nm, o);
  const p = twoPeaks(s.x_nm, removeBackground(s.x_nm, s.y, o.background_nm ?? 0), undefined, Math.max(o.binWidth_nm, 0.2), o.window_nm ?? Infinity);
  return p === null ? null : p.separation_nm;
}

export interface WidthFromSeparation {
  /** True partial separation in the glide plane (nm) and its one-sigma uncertainty. */
  readonly width_nm: number;
  readonly widthError_nm: number;
  /** Simulated peak separation per unit width at the solution (the correction's slope). */
  readonly slope: number;
  /** The ribbon's projection factor across the projected line: projected separation = W x factor. */
  readonly projection: number;
  /** Every simulated point (width, peak separation or null when unresolved), in the order computed. */
  readonly simulated: readonly { readonly width_nm: number; readonly separation_nm: number | null }[];
}

/**
 * The ribbon width whose simulated peak separation equals `separation_nm`.
 * InputError when no width in the searched range reproduces it.
 */
export function widthFromSeparation(t: RibbonTarget, separation_nm: number, separationError_nm: number, o: StripOptions): WidthFromSeparation {
  const g = ribbonStripGeometry(t);
  if (g.projection < 0.05) {
    throw new InputError(`condition "${g.c.id}": the ribbon is seen nearly edge-on (its glide plane almost contains the beam), so both partials project onto one line; use a condition in another beam direction`);
  }
  const sims: { width_nm: number; separation_nm: number | null }[] = [];
  const f = (w: number) => {
    const s = simulatedSeparation(t, w, o);
    sims.push({ width_nm: w, separation_nm: s });
    return s;
  };
  const guess = separation_nm / g.projection;
  // widths on a geometric grid from 0.25 to 4 times the naive guess, walked outward from it
  const grid = [1, 0.8, 1.25, 0.62, 1.6, 0.47, 2.1, 0.35, 2.8, 0.25, 4].map((k) => k * guess).filter((w) => w <= 2 * o.halfWidth_nm);
  const pts: { w: number; s: number | null }[] = [];
  let bracket: [number, number, number, number] | null = null;
  for (const w of grid) {
    pts.push({ w, s: f(w) });
    const sorted = [...pts].sort((a, b) => a.w - b.w);
    for (let i = 0; i + 1 < sorted.length; i++) {
      const a = sorted[i], b = sorted[i + 1];
      if (a.s !== null && b.s !== null && (a.s - separation_nm) * (b.s - separation_nm) <= 0) {
        bracket = [a.w, a.s, b.w, b.s];
        break;
      }
    }
    if (bracket !== null) break;
  }
  if (bracket === null) {
    const resolved = sims.filter((s) => s.separation_nm !== null) as { width_nm: number; separation_nm: number }[];
    const range = resolved.length === 0 ? 'no width gave two resolved peaks' : `the simulated separations run from ${Math.min(...resolved.map((s) => s.separation_nm)).toFixed(2)} to ${Math.max(...resolved.map((s) => s.separation_nm)).toFixed(2)} nm`;
    throw new InputError(`the measured peak separation ${separation_nm.toFixed(2)} nm is not reproduced by any simulated ribbon width from ${Math.min(...grid).toFixed(2)} to ${Math.max(...grid).toFixed(2)} nm (${range}); check the condition (g, weak-beam n, beams), the depth and line of the defect, and --line-angle`);
  }
  let [wa, sa, wb, sb] = bracket;
  let solved: { w: number; s: number } | null = null;
  // regula falsi with a bisection fallback inside the bracket: until the simulated separation matches to
  // 1e-3 of a bin, the bracket is 1 % of a bin wide, or after 8 steps
  for (let it = 0; it < 8 && Math.abs(wb - wa) > 0.01 * o.binWidth_nm; it++) {
    let wm = wa + ((separation_nm - sa) * (wb - wa)) / (sb - sa || 1e-30);
    // alternate with bisection so that one end cannot stall
    if (it % 2 === 1 || !(wm > Math.min(wa, wb) && wm < Math.max(wa, wb))) wm = 0.5 * (wa + wb);
    const sm = f(wm);
    if (sm === null) { wa = wm; continue; }
    if (Math.abs(sm - separation_nm) < 1e-3 * o.binWidth_nm) { solved = { w: wm, s: sm }; break; }
    if ((sa - separation_nm) * (sm - separation_nm) <= 0) { wb = wm; sb = sm; } else { wa = wm; sa = sm; }
  }
  if (solved === null && Math.abs(sb - sa) > Math.max(2 * o.binWidth_nm, 0.1 * separation_nm)) {
    throw new InputError(`the simulated peak separation jumps from ${sa.toFixed(2)} to ${sb.toFixed(2)} nm near a ribbon width of ${(0.5 * (wa + wb)).toFixed(2)} nm (another maximum of the profile takes over), so the measured ${separation_nm.toFixed(2)} nm has no unique width; narrow the peak search with --window or use a weak-beam condition with larger n`);
  }
  // the slope d(separation)/dW near the solution: from the two resolved simulated widths nearest to it
  const width = solved !== null ? solved.w : Math.abs(sb - sa) < 1e-12 ? 0.5 * (wa + wb) : wa + ((separation_nm - sa) * (wb - wa)) / (sb - sa);
  const near = sims
    .filter((x) => x.separation_nm !== null)
    .sort((p, q) => Math.abs(p.width_nm - width) - Math.abs(q.width_nm - width));
  // a baseline of at least a tenth of the width (or two bins): the simulated separations jitter on the scale of
  // the strip's sampling, so nearby points give a noisy slope
  const base = Math.max(0.1 * width, 2 * o.binWidth_nm);
  const far = near.find((x) => Math.abs(x.width_nm - near[0].width_nm) >= base) ?? near[near.length - 1];
  const slope = ((far.separation_nm as number) - (near[0].separation_nm as number)) / (far.width_nm - near[0].width_nm || 1e-30);
  if (!(Math.abs(slope) > 1e-6)) throw new InputError('the simulated peak separation does not change with the ribbon width here, so the width cannot be read from it; use another weak-beam condition');
  // the measured separation's error through the slope; plus half the final bracket when the search stopped on the bracket
  const widthError = Math.hypot(separationError_nm / Math.abs(slope), solved !== null ? 0 : 0.5 * Math.abs(wb - wa));
  return { width_nm: width, widthError_nm: widthError, slope, projection: g.projection, simulated: sims };
}

/** The width the scenario itself would give the ribbon (from the stacking-fault energy or its separation_nm), for reference. */
export function scenarioRibbonWidth_nm(t: RibbonTarget): number {
  const d = ribbonDefect(t);
  return dissociationWidth_nm(t.sc.material, d, dissociationPair(t.sc.material, d), t.sc.elasticity);
}

export type { Vec3 };

/**
 * How well the simulated strip at a width explains a measured profile: R^2 of
 * the least-squares fit measured ~ a * simulated + c, both with their smooth
 * background removed (StripOptions.background_nm), the simulation interpolated
 * at the measured bins. Near 1: the same shape; low: the two measured peaks
 * are probably not the partials of this ribbon (unresolved ribbon, another
 * defect, wrong condition). The best over both senses of the profile and
 * shifts of the simulation by up to 2 nm (the centre given may be off).
 */
export function profileAgreement(t: RibbonTarget, width_nm: number, o: StripOptions, x_nm: ArrayLike<number>, measured: ArrayLike<number>): number {
  const s = simulatedStrip(t, width_nm, o);
  const sim = removeBackground(s.x_nm, s.y, o.background_nm ?? 0);
  const h = s.x_nm[1] - s.x_nm[0];
  // a trace has no sense: the measured profile may run the other way; and the centre the user gave may be off
  // the ribbon's centre by up to 2 nm: take the best over both senses and those shifts (steps of a quarter bin)
  let best = -Infinity;
  const step = Math.max(h, o.binWidth_nm / 4);
  for (let d = -2; d <= 2 + 1e-9; d += step) {
    best = Math.max(best, r2(sim, s.x_nm[0] - d, h, x_nm, measured, 1), r2(sim, s.x_nm[0] - d, h, x_nm, measured, -1));
  }
  return best;
}

function r2(sim: Float64Array, x0: number, h: number, x_nm: ArrayLike<number>, measured: ArrayLike<number>, sense: number): number {
  const xs: number[] = [], ys: number[] = [];
  for (let k = 0; k < x_nm.length; k++) {
    const f = (sense * x_nm[k] - x0) / h;
    const i = Math.floor(f);
    if (i < 0 || i + 1 >= sim.length || !Number.isFinite(measured[k])) continue;
    xs.push(sim[i] + (f - i) * (sim[i + 1] - sim[i]));
    ys.push(measured[k]);
  }
  const n = xs.length;
  if (n < 3) return NaN;
  const mx = xs.reduce((p, q) => p + q, 0) / n, my = ys.reduce((p, q) => p + q, 0) / n;
  let sxx = 0, sxy = 0, syy = 0;
  for (let k = 0; k < n; k++) {
    sxx += (xs[k] - mx) ** 2;
    sxy += (xs[k] - mx) * (ys[k] - my);
    syy += (ys[k] - my) ** 2;
  }
  if (!(sxx > 0) || !(syy > 0)) return NaN;
  return (sxy * sxy) / (sxx * syy) * Math.sign(sxy);
}
