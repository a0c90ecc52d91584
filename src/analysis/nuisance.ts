/**
 * The nuisance parameters of one candidate: what the user states but does not
 * know exactly (w of each micrograph, the foil thickness, the depth of the
 * defect, a dislocation's line direction), with the range each may take
 * (fitSettings.ts), and the scenario and conditions a set of values gives.
 *
 * The line direction is tilted within a cone about the stated u by two
 * angles (a, b) about two axes perpendicular to u; points of the square
 * |a|, |b| <= cone outside the disc are pulled back onto its rim, so the
 * tilt never exceeds the cone.
 */
import { InputError } from '../errors.js';
import type { Vec3 } from '../math/vec3.js';
import { add, cross, dot, norm, scale, unit } from '../math/vec3.js';
import { cartesianToDirection, directionToCartesian } from '../crystal/lattice.js';
import type { Condition, DefectSpec, Scenario } from '../scenario/types.js';
import type { Candidate } from './candidates.js';
import type { PreparedMicrograph } from './identifyMicrographs.js';
import { DEFAULT_FIT, MEASURED_SIGMAS, thicknessRange, type FitSettings } from './fitSettings.js';
import { moveDefect } from './identifyView.js';
import { defectTypeOf } from '../defects/registry.js';

export interface NuisanceParameter {
  readonly name: string;
  readonly unit: string;
  /** The stated (or measured) value. */
  readonly nominal: number;
  readonly lo: number;
  readonly hi: number;
  /** "shared" by all micrographs, or the index of the one micrograph it belongs to. */
  readonly scope: 'shared' | number;
  /** Where the range comes from. */
  readonly from: 'default range' | 'scenario range' | 'measured';
}

export interface NuisanceModel {
  readonly parameters: readonly NuisanceParameter[];
  /** The candidate's scenario and the micrographs' conditions for a vector of parameter values. */
  apply(values: readonly number[]): { readonly scenario: Scenario; readonly conditions: readonly Condition[] };
  /** Line tilt (degrees) of a parameter vector, or undefined when the line is not fitted. */
  tilt_deg(values: readonly number[]): number | undefined;
}

const DEG = Math.PI / 180;

export function nuisanceModel(sc: Scenario, cand: Candidate, micrographs: readonly PreparedMicrograph[], fit: FitSettings): NuisanceModel {
  const params: NuisanceParameter[] = [];
  const d0 = cand.defect;
  // thickness
  const { nominal_nm: t0, half_nm: tHalf, measured: tMeasured } = thicknessRange(sc.thickness_nm, fit);
  params.push({ name: 'thickness', unit: 'nm', nominal: t0, lo: t0 - tHalf, hi: t0 + tHalf, scope: 'shared', from: tMeasured ? 'measured' : fit.thicknessRange === DEFAULT_FIT.thicknessRange ? 'default range' : 'scenario range' });
  // depth of the defect's point (every defect type has one)
  const point = defectTypeOf(d0).position(d0);
  const depthIndex = params.length;
  if (tMeasured && point[2] >= t0 + tHalf)
    throw new InputError(
      `fit.thickness_nm: the measured thickness ${t0} nm (at most ${t0 + tHalf} nm within ${fit.thicknessError_nm !== undefined ? `${MEASURED_SIGMAS} of its uncertainties` : 'fit.thicknessRange'}) leaves the depth ${point[2]} nm of the defect's point below the foil; check the measured thickness or give the defect's depth (its point_nm or centre_nm) within the foil`,
    );
  const depthHalf = fit.depthRange_nm ?? 0.25 * t0;
  params.push({ name: 'depth', unit: 'nm', nominal: point[2], lo: Math.max(0, point[2] - depthHalf), hi: Math.min(t0 + tHalf, point[2] + depthHalf), scope: 'shared', from: fit.depthRange_nm === undefined ? 'default range' : 'scenario range' });
  // line direction (straight dislocations only: partials and ribbons must keep their line in the fault plane)
  const lattice = sc.material.lattice;
  const u0 = d0.type === 'dislocation' && fit.lineCone_deg > 0 ? unit(directionToCartesian(lattice, d0.line)) : undefined;
  const lineIndex = u0 === undefined ? -1 : params.length;
  let e1: Vec3 = [1, 0, 0];
  let e2: Vec3 = [0, 1, 0];
  if (u0 !== undefined) {
    const trial: Vec3 = Math.abs(u0[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
    e1 = unit(cross(u0, trial));
    e2 = cross(u0, e1);
    const c = fit.lineCone_deg;
    const from = c === DEFAULT_FIT.lineCone_deg ? 'default range' : 'scenario range';
    params.push({ name: 'line tilt a', unit: 'degrees', nominal: 0, lo: -c, hi: c, scope: 'shared', from });
    params.push({ name: 'line tilt b', unit: 'degrees', nominal: 0, lo: -c, hi: c, scope: 'shared', from });
  }
  // w per micrograph
  const wIndex: number[] = [];
  micrographs.forEach((m, i) => {
    const measured = m.settings.w !== undefined;
    const w0 = m.settings.w ?? (m.condition.deviation.kind === 'w' ? m.condition.deviation.w : m.resolved.w);
    const half = m.settings.wError !== undefined ? MEASURED_SIGMAS * m.settings.wError : fit.wRange;
    wIndex.push(params.length);
    params.push({ name: `w ${m.conditionId}`, unit: '', nominal: w0, lo: w0 - half, hi: w0 + half, scope: i, from: measured && m.settings.wError !== undefined ? 'measured' : fit.wRange === DEFAULT_FIT.wRange ? 'default range' : 'scenario range' });
  });
  const cone = fit.lineCone_deg;
  const tiltOf = (v: readonly number[]): [number, number] | undefined => {
    if (lineIndex < 0) return undefined;
    let a = v[lineIndex];
    let b = v[lineIndex + 1];
    const r = Math.hypot(a, b);
    if (r > cone && r > 0) {
      a *= cone / r;
      b *= cone / r;
    }
    return [a, b];
  };
  return {
    parameters: params,
    tilt_deg: (v) => {
      const t = tiltOf(v);
      return t === undefined ? undefined : Math.hypot(t[0], t[1]);
    },
    apply(v) {
      let d: DefectSpec = d0;
      d = moveDefect(d, (p) => [p[0], p[1], v[depthIndex]]);
      const t = tiltOf(v);
      // no tilt: the stated line itself (not its normalised copy), so the stated values give the stated scenario exactly
      if (t !== undefined && u0 !== undefined && d.type === 'dislocation' && (t[0] !== 0 || t[1] !== 0)) {
        const u = unit(add(u0, add(scale(e1, Math.tan(t[0] * DEG)), scale(e2, Math.tan(t[1] * DEG)))));
        const line = cartesianToDirection(lattice, u);
        const n = norm(line);
        d = { ...d, line: scale(line, 1 / n) };
      }
      const scenario: Scenario = { ...sc, thickness_nm: v[0], defects: sc.defects.map((x, i) => (i === cand.defectIndex ? d : x)) };
      const conditions = micrographs.map((m, i) => ({ ...m.condition, deviation: { kind: 'w' as const, w: v[wIndex[i]] } }));
      return { scenario, conditions };
    },
  };
}

/** The unit vector check used by tests: angle (degrees) between two crystal directions' Cartesian forms. */
export function directionAngle_deg(sc: Scenario, a: Vec3, b: Vec3): number {
  const l = sc.material.lattice;
  const x = unit(directionToCartesian(l, a));
  const y = unit(directionToCartesian(l, b));
  return Math.acos(Math.min(1, Math.abs(dot(x, y)))) / DEG;
}
