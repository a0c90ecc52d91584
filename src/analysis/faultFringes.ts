/**
 * Fault nature from the outer fringes of an inclined planar fault. For each
 * fault and condition: alpha = 2 pi g.R_f for the intrinsic and the extrinsic
 * reading, and, by simulating a line of columns across the fault, whether the
 * outer fringe at the top-surface end and at the bottom-surface end is
 * bright or dark in bright and dark field, and on which side of the image
 * (relative to g) the top-surface end lies. The user compares these with a
 * bright/dark-field pair (Hashimoto, Howie & Whelan 1962: BF outer fringes
 * alike, DF outer fringes unlike; the top-surface fringe is the same in BF
 * and DF).
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, norm, scale, unit } from '../math/vec3.js';
import { planeNormalToCartesian, directionToCartesian } from '../crystal/lattice.js';
import type { FaultSpec, Scenario } from '../scenario/types.js';
import { resolveCondition, type ResolvedCondition } from '../imaging/resolveCondition.js';
import type { DefectModel } from '../imaging/fieldSpecs.js';
import { referenceFrame } from '../imaging/scenarioFrame.js';
import { imagePointToCrystal } from '../geometry/frames.js';
import { background, renderJob } from '../imaging/renderScenario.js';
import { columnEvaluator } from '../imaging/renderRows.js';

export type Tone = 'bright' | 'dark' | 'none';

export interface FringeReading {
  /** "intrinsic", "extrinsic" or "as given". */
  readonly reading: string;
  readonly vector: Vec3;
  /** alpha = 2 pi g.R_f reduced to (-180, 180] degrees. */
  readonly alpha_deg: number;
  readonly bf: { readonly top: Tone; readonly bottom: Tone };
  readonly df: { readonly top: Tone; readonly bottom: Tone };
}

export interface FaultConditionAnalysis {
  readonly fault: string;
  readonly condition: string;
  readonly g: Vec3;
  /** Unit image vector (x right, y down) from the bottom-surface end of the fault image to its top-surface end. */
  readonly topDirection: readonly [number, number];
  /** Projected width of the fault image (nm) between its two surface ends. */
  readonly width_nm: number;
  /** Whether g (projected in the image) points towards the top-surface end (+1), away (-1) or across (0). */
  readonly gTowardsTop: number;
  readonly readings: readonly FringeReading[];
  /** True when the fault is seen edge-on or too narrow to show fringes. */
  readonly edgeOn: boolean;
  /**
   * False when the outer-fringe read-out should not be trusted: the foil is
   * thinner than 3 xi_eff (the outer-fringe rules assume a thick, absorbing
   * foil), or the simulated fringes break the Hashimoto-Howie-Whelan pattern.
   */
  readonly reliable: boolean;
  readonly note: string;
}

/** Thickness (in effective extinction distances) below which outer-fringe read-outs are flagged (common practice). */
export const MIN_THICKNESS_XI_EFF = 3;

/** alpha in degrees reduced to (-180, 180]. */
export function faultPhase_deg(g: Vec3, R: Vec3): number {
  const x = dot(g, R);
  let f = x - Math.round(x);
  if (f <= -0.5) f += 1;
  return Object.is(f * 360, -0) ? 0 : f * 360;
}

/** The intrinsic and extrinsic readings of a {111} fault in a cubic crystal, else the given vector only. */
export function faultReadings(f: FaultSpec): { reading: string; vector: Vec3 }[] {
  const p = f.plane;
  const is111 = p.every((h) => h !== 0 && Math.abs(Math.abs(h) - Math.abs(p[0])) < 1e-9);
  if (f.nature === 'vector' || !is111) return [{ reading: 'as given', vector: f.vector }];
  // the two natures differ by the sign of R_f (physics.md section 5)
  const other = scale(f.vector, -1);
  return f.nature === 'intrinsic'
    ? [{ reading: 'intrinsic', vector: f.vector }, { reading: 'extrinsic', vector: other }]
    : [{ reading: 'intrinsic', vector: other }, { reading: 'extrinsic', vector: f.vector }];
}

/** `onStep(label)` is called before each fault and condition (for progress). */
export function analyseFaults(sc: Scenario, samples = 400, onStep?: (label: string) => void): FaultConditionAnalysis[] {
  const out: FaultConditionAnalysis[] = [];
  for (const d of sc.defects) {
    if (d.type !== 'fault') continue;
    for (const c of sc.conditions) {
      onStep?.(`${d.label}, ${c.id}`);
      out.push(analyseOne(sc, d, resolveCondition(sc, c), samples));
    }
  }
  return out;
}

export interface FaultGeometry {
  /** A point of the fault plane (Cartesian nm) and its unit normal pointing to the side behind the fault. */
  readonly P: Vec3;
  readonly n: Vec3;
  /** Image point (x, y) of the bottom-surface end on the line through the fault's point. */
  readonly bottom: readonly [number, number];
  /** Unit image vector from the bottom-surface end to the top-surface end. */
  readonly topDirection: readonly [number, number];
  readonly width_nm: number;
  readonly gTowardsTop: number;
  readonly edgeOn: boolean;
}

/** Where the two surface ends of a fault image lie under one condition. */
export function faultGeometry(sc: Scenario, f: FaultSpec, c: ResolvedCondition): FaultGeometry {
  const l = sc.material.lattice;
  const fr = c.frame;
  const ref = referenceFrame(sc);
  const P = imagePointToCrystal(ref, f.point_nm);
  let n = unit(planeNormalToCartesian(l, f.plane));
  if (dot(n, ref.ez) < 0) n = scale(n, -1);
  const N = fr.normal;
  // the fault meets the two surfaces along lines parallel to n x N; their projections are parallel
  const traceDir = cross(n, N);
  const edge = { P, n, bottom: [0, 0] as const, topDirection: [0, 0] as const, width_nm: 0, gTowardsTop: 0, edgeOn: true };
  if (norm(traceDir) < 1e-9 || Math.abs(dot(fr.ez, n)) < 1e-6) return edge;
  const v = unit(cross(traceDir, n)); // in-plane, perpendicular to the trace
  const onSurface = (depth: number): [number, number] => {
    const a = (depth - dot(P, N)) / dot(v, N);
    const Q: Vec3 = [P[0] + a * v[0], P[1] + a * v[1], P[2] + a * v[2]];
    return [dot(Q, fr.ex), dot(Q, fr.ey)];
  };
  const top = onSurface(0);
  const bottom = onSurface(fr.thickness_nm);
  const tx = dot(traceDir, fr.ex);
  const ty = dot(traceDir, fr.ey);
  const tl = Math.hypot(tx, ty);
  let perp: [number, number] = [-ty / tl, tx / tl];
  let width = (top[0] - bottom[0]) * perp[0] + (top[1] - bottom[1]) * perp[1];
  if (width < 0) {
    perp = [-perp[0], -perp[1]];
    width = -width;
  }
  if (width < 1e-3) return { ...edge, topDirection: perp, width_nm: width };
  // start on the bottom trace, on the line through the top point along perp
  const start: [number, number] = [top[0] - width * perp[0], top[1] - width * perp[1]];
  const gx = dot(c.g_cart, fr.ex);
  const gy = dot(c.g_cart, fr.ey);
  const gt = (gx * perp[0] + gy * perp[1]) / Math.hypot(gx, gy);
  return { P, n, bottom: start, topDirection: perp, width_nm: width, gTowardsTop: Math.abs(gt) < 0.1 ? 0 : Math.sign(gt), edgeOn: false };
}

function analyseOne(sc: Scenario, f: FaultSpec, c: ResolvedCondition, samples: number): FaultConditionAnalysis {
  const geo = faultGeometry(sc, f, c);
  const base = { fault: f.label, condition: c.id, g: c.g, topDirection: geo.topDirection, width_nm: geo.width_nm, gTowardsTop: geo.gTowardsTop, edgeOn: geo.edgeOn };
  if (geo.edgeOn) return { ...base, readings: [], reliable: false, note: 'fault seen edge-on: no fringes' };
  const readings = faultReadings(f).map(({ reading, vector }) => {
    const p = profileAcross(sc, c, geo.P, geo.n, vector, geo.bottom, geo.topDirection, geo.width_nm, samples);
    return {
      reading,
      vector,
      alpha_deg: faultPhase_deg(c.g, vector),
      bf: { top: outerFringe(p.bf, p.background.bf, 'end'), bottom: outerFringe(p.bf, p.background.bf, 'start') },
      df: { top: outerFringe(p.df, p.background.df, 'end'), bottom: outerFringe(p.df, p.background.df, 'start') },
    };
  });
  const xiEff = c.xi_nm / Math.sqrt(1 + c.w * c.w);
  const thick = c.frame.columnLength_nm / xiEff;
  const visible = readings.filter((r) => r.bf.top !== 'none');
  const pattern = visible.every((r) => r.bf.top === r.df.top && r.bf.bottom !== r.df.bottom && r.bf.top === r.bf.bottom);
  let note = 'ok';
  if (visible.length === 0) note = 'g.R_f is an integer: the fault is invisible';
  else if (thick < MIN_THICKNESS_XI_EFF) note = `foil only ${thick.toFixed(1)} xi_eff thick (< ${MIN_THICKNESS_XI_EFF}): outer-fringe rules unreliable`;
  else if (!pattern) note = 'simulated fringes do not follow the thick-foil pattern here: read-out unreliable';
  return { ...base, readings, reliable: note === 'ok', note };
}

export interface FaultProfile {
  /** Intensities at `samples` columns from the bottom-surface end (index 0) to the top-surface end. */
  readonly bf: number[];
  readonly df: number[];
  readonly background: { readonly bf: number; readonly df: number };
}

/** Bright- and dark-field intensity along a line of columns across a fault image (fault alone, no other defect). */
export function profileAcross(
  sc: Scenario,
  c: ResolvedCondition,
  P: Vec3,
  n: Vec3,
  vector: Vec3,
  start: readonly [number, number],
  dir: readonly [number, number],
  length: number,
  samples: number,
): FaultProfile {
  const model: DefectModel = {
    fields: [],
    surfaces: [{ kind: 'plane', point_nm: P, normal: n, jump_nm: directionToCartesian(sc.material.lattice, vector) }],
  };
  const job = { ...renderJob(sc, c), model };
  const ev = columnEvaluator(job);
  const bf: number[] = [];
  const df: number[] = [];
  const amp = new Float64Array(4);
  for (let i = 0; i < samples; i++) {
    const s = ((i + 0.5) / samples) * length;
    ev.column(amp, start[0] + s * dir[0], start[1] + s * dir[1]);
    bf.push(amp[0] ** 2 + amp[1] ** 2);
    df.push(amp[2] ** 2 + amp[3] ** 2);
  }
  return { bf, df, background: background(job) };
}

/**
 * Tone of the outer fringe at one end of a profile: the first local extremum
 * of I - background met from that end (the fringe's peak).
 */
export function outerFringe(profile: readonly number[], bg: number, from: 'start' | 'end'): Tone {
  const p = from === 'start' ? profile : [...profile].reverse();
  const d = p.map((v) => v - bg);
  const scaleD = Math.max(...d.map(Math.abs));
  if (scaleD < 1e-9) return 'none';
  for (let i = 1; i < d.length - 1; i++) {
    const isMax = d[i] >= d[i - 1] && d[i] > d[i + 1];
    const isMin = d[i] <= d[i - 1] && d[i] < d[i + 1];
    if ((isMax || isMin) && Math.abs(d[i]) > 0.05 * scaleD) return d[i] > 0 ? 'bright' : 'dark';
  }
  return d[0] > 0 ? 'bright' : 'dark';
}
