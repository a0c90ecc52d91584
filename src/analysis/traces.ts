/**
 * Trace analysis: the direction u of a straight dislocation line from the
 * directions of its projections ("traces") on micrographs taken in two or more
 * beam directions (the method of Edington 1975, Practical Electron Microscopy
 * in Materials Science, and Williams & Carter 2009, done on the stereographic
 * projection there; here with vectors and a least-squares fit).
 *
 * Angle convention (the project's image frame, src/geometry/frames.ts):
 * angles on a micrograph are degrees counter-clockwise from the image's +x
 * axis (to the right) as the micrograph is displayed, with +y pointing down
 * (image rows grow downwards); a direction at screen angle theta has image
 * components (cos theta, -sin theta) on (ex, ey). The projected line makes
 * the angle delta = lineAngle - gAngle with the image's g, counted
 * counter-clockwise on the screen. Viewed along the beam B (ez, into the foil)
 * the screen's counter-clockwise sense is a rotation by -delta about ez, so the
 * projected line direction in the crystal is
 *     p = cos(delta) g^ - sin(delta) (ez x g^),     g^ = g projected normal to B, unit.
 * A trace has no sense: lineAngle counts modulo 180 degrees.
 *
 * Each view puts u in the plane spanned by B and p (normal n = B x p). Two
 * views give u = n1 x n2; more views are fitted by least squares on the
 * angular residuals (measured minus predicted trace angle, each divided by
 * its stated error), Gauss-Newton on the unit sphere started from the
 * smallest-eigenvalue vector of sum n n^T / sigma^2. The covariance of u is
 * (J^T J)^-1 on the tangent plane (linear propagation of the angle errors).
 *
 * All vectors here are Cartesian in the crystal frame unless named `_lattice`.
 */
import type { Vec3 } from '../math/vec3.js';
import { add, cross, dot, norm, scale, sub, unit } from '../math/vec3.js';
import type { Lattice } from '../crystal/lattice.js';
import { cartesianToDirection, directBasis, directionToCartesian, planeNormalToCartesian } from '../crystal/lattice.js';
import { primitiveDirections } from '../crystal/formatIndices.js';
import { crystalDirection, nearestZone, type ZoneAxis } from '../geometry/conditionGeometry.js';
import { InputError } from '../errors.js';

const DEG = Math.PI / 180;

/** One micrograph: its beam direction, a reflection g in its zone, and the measured angles. */
export interface TraceView {
  /** Beam direction B (lattice direction, 3 indices), pointing into the foil. */
  readonly beam: Vec3;
  /** A reflection g (Miller indices) lying in the zone of B, whose direction on the micrograph is known. */
  readonly g: Vec3;
  /** Direction of g on the micrograph: degrees counter-clockwise from +x, +y down. */
  readonly gAngle_deg: number;
  /** Direction of the projected line on the micrograph, same convention (modulo 180). */
  readonly lineAngle_deg: number;
  /** One standard deviation of (lineAngle - gAngle), degrees (> 0). */
  readonly angleError_deg: number;
  /** How the user names this view in messages, e.g. "--view 2". */
  readonly name: string;
}

/** Wrap an angle (degrees) into [-90, 90): traces have no sense. */
export function wrapTrace_deg(a: number): number {
  return ((((a + 90) % 180) + 180) % 180) - 90;
}

/** The unit vectors of one view: ez (beam), g^ (g projected normal to the beam) and h = ez x g^. */
export interface ViewAxes {
  readonly ez: Vec3;
  readonly gHat: Vec3;
  readonly h: Vec3;
}

/** Unit vectors of a view; refuses a g that is not (within 5 degrees) in the zone of the beam. */
export function viewAxes(l: Lattice, v: TraceView): ViewAxes {
  const ez = unit(directionToCartesian(l, v.beam));
  const gc = planeNormalToCartesian(l, v.g);
  const off = Math.asin(Math.min(1, Math.abs(dot(ez, gc)) / norm(gc))) / DEG;
  if (off > 5) {
    throw new InputError(
      `${v.name}: g = (${v.g.join(' ')}) is ${off.toFixed(1)} degrees out of the zone of the beam [${v.beam.join(' ')}] (g.B must be 0); give a reflection of that zone, i.e. one seen in that beam direction`,
    );
  }
  const gHat = unit(sub(gc, scale(ez, dot(gc, ez))));
  return { ez, gHat, h: cross(ez, gHat) };
}

/** Projected line direction p (unit, crystal Cartesian) measured in one view. */
export function measuredTrace(a: ViewAxes, v: TraceView): Vec3 {
  const d = (v.lineAngle_deg - v.gAngle_deg) * DEG;
  return add(scale(a.gHat, Math.cos(d)), scale(a.h, -Math.sin(d)));
}

/** Trace angle (degrees, from g, counter-clockwise on the screen, in [-90, 90)) that a line u would show in a view. */
export function predictedTraceFromG_deg(a: ViewAxes, u: Vec3): number {
  const x = dot(u, a.gHat);
  const y = -dot(u, a.h);
  return wrapTrace_deg(Math.atan2(y, x) / DEG);
}

/**
 * The screen angle (degrees, counter-clockwise from +x, +y down) at which a
 * line u appears in a view, given where g appears: the forward model of a
 * trace measurement (used by tests and by `traces` for residuals).
 */
export function predictedLineAngle_deg(l: Lattice, v: Omit<TraceView, 'lineAngle_deg' | 'angleError_deg'>, u_cart: Vec3): number {
  const a = viewAxes(l, { ...v, lineAngle_deg: 0, angleError_deg: 1 });
  return v.gAngle_deg + predictedTraceFromG_deg(a, u_cart);
}

export interface ViewResidual {
  readonly name: string;
  /** Measured minus fitted trace angle, degrees (in [-90, 90)). */
  readonly residual_deg: number;
  /** The angle the fitted u shows in this view (screen degrees, modulo 180, in the range of the measured one). */
  readonly fittedLineAngle_deg: number;
  /** Angle between u and this view's beam, degrees (near 0: seen nearly end-on, its trace is ill defined). */
  readonly angleToBeam_deg: number;
}

export interface TraceFit {
  /** Unit line direction, crystal Cartesian; its sense follows the first view's line angle (u . p1 >= 0). */
  readonly u_cart: Vec3;
  /** u as a crystal direction, largest |index| 1 (4 indices for hexagonal crystals). */
  readonly u: readonly number[];
  /** u in 3-index lattice units (any scale), for the scenario's "line". */
  readonly u_lattice: Vec3;
  /** One-standard-deviation angles of u along the principal axes of its covariance, degrees. */
  readonly sigmaMajor_deg: number;
  readonly sigmaMinor_deg: number;
  /** Radius of the one-sigma cone, sqrt(major^2 + minor^2), degrees. */
  readonly cone_deg: number;
  /** Principal axes (unit, Cartesian, normal to u) of the uncertainty, major first. */
  readonly axes: readonly [Vec3, Vec3];
  /** Nearest low-index direction (indices up to 3) and its angle to u. */
  readonly nearest: ZoneAxis;
  /** Sum of squared normalised residuals and its degrees of freedom (views - 2). */
  readonly chi2: number;
  readonly dof: number;
  readonly views: readonly ViewResidual[];
}

/** Eigen-decomposition of a symmetric 3 x 3 matrix (cyclic Jacobi): values ascending, vectors as rows. */
export function symmetricEigen3(m: readonly (readonly number[])[]): { values: number[]; vectors: Vec3[] } {
  const a = m.map((r) => [...r]);
  const v = [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  for (let sweep = 0; sweep < 50; sweep++) {
    const off = a[0][1] ** 2 + a[0][2] ** 2 + a[1][2] ** 2;
    if (off < 1e-30 * (a[0][0] ** 2 + a[1][1] ** 2 + a[2][2] ** 2 + 1e-300)) break;
    for (const [p, q] of [
      [0, 1],
      [0, 2],
      [1, 2],
    ]) {
      if (a[p][q] === 0) continue;
      const theta = (a[q][q] - a[p][p]) / (2 * a[p][q]);
      const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1);
      const s = t * c;
      for (let k = 0; k < 3; k++) {
        const akp = a[k][p], akq = a[k][q];
        a[k][p] = c * akp - s * akq;
        a[k][q] = s * akp + c * akq;
      }
      for (let k = 0; k < 3; k++) {
        const apk = a[p][k], aqk = a[q][k];
        a[p][k] = c * apk - s * aqk;
        a[q][k] = s * apk + c * aqk;
      }
      for (let k = 0; k < 3; k++) {
        const vkp = v[k][p], vkq = v[k][q];
        v[k][p] = c * vkp - s * vkq;
        v[k][q] = s * vkp + c * vkq;
      }
    }
  }
  const order = [0, 1, 2].sort((i, j) => a[i][i] - a[j][j]);
  return { values: order.map((i) => a[i][i]), vectors: order.map((i) => [v[0][i], v[1][i], v[2][i]] as Vec3) };
}

/** Two unit vectors completing u to a right-handed orthonormal set. */
function tangentBasis(u: Vec3): [Vec3, Vec3] {
  const ax = Math.abs(u[0]) < 0.6 ? ([1, 0, 0] as Vec3) : Math.abs(u[1]) < 0.6 ? ([0, 1, 0] as Vec3) : ([0, 0, 1] as Vec3);
  const e1 = unit(cross(u, ax));
  return [e1, cross(u, e1)];
}

/** Smallest angle (degrees) between two beam directions among the views' beams, and the largest. */
function beamSpread_deg(axes: readonly ViewAxes[]): number {
  let best = 0;
  for (let i = 0; i < axes.length; i++) for (let j = i + 1; j < axes.length; j++) best = Math.max(best, Math.acos(Math.min(1, Math.abs(dot(axes[i].ez, axes[j].ez)))) / DEG);
  return best;
}

/**
 * The line direction from two or more traces (see the module comment).
 * Throws InputError for fewer than two views, beams that are all parallel,
 * or traces whose planes coincide (no unique line).
 */
export function fitLineDirection(l: Lattice, views: readonly TraceView[]): TraceFit {
  if (views.length < 2) throw new InputError('--view: trace analysis needs at least two views taken in different beam directions; give --view once per micrograph');
  for (const v of views) {
    if (!(v.angleError_deg > 0) || !Number.isFinite(v.angleError_deg)) throw new InputError(`${v.name}: the angle error must be a positive number of degrees`);
    if (!Number.isFinite(v.gAngle_deg) || !Number.isFinite(v.lineAngle_deg)) throw new InputError(`${v.name}: the angles must be finite numbers of degrees`);
  }
  const axes = views.map((v) => viewAxes(l, v));
  if (beamSpread_deg(axes) < 3) {
    throw new InputError('--view: the beam directions of all views lie within 3 degrees of each other, so the traces cannot fix the line in depth; add a micrograph taken in a beam direction tilted at least 10-20 degrees away');
  }
  const p = views.map((v, i) => measuredTrace(axes[i], v));
  const n = axes.map((a, i) => unit(cross(a.ez, p[i])));
  const sig = views.map((v) => v.angleError_deg * DEG);

  // start: the direction normal to all planes (B_i, p_i), weighted by 1/sigma^2
  const M = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  n.forEach((ni, i) => {
    for (let r = 0; r < 3; r++) for (let c = 0; c < 3; c++) M[r][c] += (ni[r] * ni[c]) / sig[i] ** 2;
  });
  const eig = symmetricEigen3(M);
  if (eig.values[1] < eig.values[2] * Math.sin(1 * DEG) ** 2) {
    throw new InputError(
      '--view: the planes through each beam and its trace coincide (the line lies in the plane of all the beams, or the beams are nearly the same), so u is not determined; add a view whose beam lies off that plane',
    );
  }
  let u = eig.vectors[0];
  if (dot(u, p[0]) < 0) u = scale(u, -1);

  // Gauss-Newton on the sphere: residual_i = wrap(measured_i - predicted_i(u)) / sigma_i
  const measured = views.map((v) => wrapTrace_deg(v.lineAngle_deg - v.gAngle_deg) * DEG);
  const residualsAndJacobian = (uu: Vec3) => {
    const [e1, e2] = tangentBasis(uu);
    const r: number[] = [];
    const J: [number, number][] = [];
    axes.forEach((a, i) => {
      const x = dot(uu, a.gHat);
      const y = -dot(uu, a.h);
      const q2 = x * x + y * y;
      const pred = Math.atan2(y, x);
      r.push(wrapTrace_deg((measured[i] - pred) / DEG) * DEG / sig[i]);
      // d pred / d u = (x dy - y dx) / q2 with dy = -h, dx = g^; d residual = -d pred
      const grad = scale(add(scale(a.h, -x), scale(a.gHat, -y)), 1 / Math.max(q2, 1e-30));
      J.push([-dot(grad, e1) / sig[i], -dot(grad, e2) / sig[i]]);
    });
    return { r, J, e1, e2 };
  };
  for (let it = 0; it < 100; it++) {
    const { r, J, e1, e2 } = residualsAndJacobian(u);
    let a11 = 0, a12 = 0, a22 = 0, b1 = 0, b2 = 0;
    J.forEach((j, i) => {
      a11 += j[0] * j[0];
      a12 += j[0] * j[1];
      a22 += j[1] * j[1];
      b1 += j[0] * r[i];
      b2 += j[1] * r[i];
    });
    const det = a11 * a22 - a12 * a12;
    if (!(det > 0)) break;
    const d1 = -(a22 * b1 - a12 * b2) / det;
    const d2 = -(-a12 * b1 + a11 * b2) / det;
    u = unit(add(u, add(scale(e1, d1), scale(e2, d2))));
    if (Math.hypot(d1, d2) < 1e-13) break;
  }
  const { r, J, e1, e2 } = residualsAndJacobian(u);
  let a11 = 0, a12 = 0, a22 = 0;
  for (const j of J) {
    a11 += j[0] * j[0];
    a12 += j[0] * j[1];
    a22 += j[1] * j[1];
  }
  const det = a11 * a22 - a12 * a12;
  // covariance (radians^2) on (e1, e2) = (J^T J)^-1
  const c11 = a22 / det, c12 = -a12 / det, c22 = a11 / det;
  const tr = c11 + c22;
  const disc = Math.sqrt(Math.max(0, ((c11 - c22) / 2) ** 2 + c12 * c12));
  const lMaj = tr / 2 + disc, lMin = Math.max(0, tr / 2 - disc);
  const ang = 0.5 * Math.atan2(2 * c12, c11 - c22);
  const major = add(scale(e1, Math.cos(ang)), scale(e2, Math.sin(ang)));
  const minor = cross(u, major);
  const chi2 = r.reduce((s, x) => s + x * x, 0);
  const uLattice = latticeDirectionOf(l, u);
  return {
    u_cart: u,
    u: crystalDirection(l, u),
    u_lattice: uLattice,
    sigmaMajor_deg: Math.sqrt(lMaj) / DEG,
    sigmaMinor_deg: Math.sqrt(lMin) / DEG,
    cone_deg: Math.sqrt(lMaj + lMin) / DEG,
    axes: [major, minor],
    nearest: nearestZone(l, u, 3),
    chi2,
    dof: views.length - 2,
    views: views.map((v, i) => {
      const fromG = predictedTraceFromG_deg(axes[i], u);
      const fitted = v.gAngle_deg + fromG;
      // the fitted angle written within 90 degrees of the measured one
      const shown = v.lineAngle_deg + wrapTrace_deg(fitted - v.lineAngle_deg);
      return {
        name: v.name,
        residual_deg: wrapTrace_deg(v.lineAngle_deg - fitted),
        fittedLineAngle_deg: shown,
        angleToBeam_deg: Math.acos(Math.min(1, Math.abs(dot(u, axes[i].ez)))) / DEG,
      };
    }),
  };
}

/** Lattice components [uvw] of a Cartesian direction, scaled so that the largest |index| is 1. */
function latticeDirectionOf(l: Lattice, c: Vec3): Vec3 {
  const d = cartesianToDirection(l, c);
  const m = Math.max(...d.map(Math.abs));
  return [d[0] / m, d[1] / m, d[2] / m];
}

/** Miller indices (h k l) of the plane whose normal is the Cartesian vector n: h_i = a_i . n. */
export function planeIndicesOf(l: Lattice, n: Vec3): Vec3 {
  const A = directBasis(l);
  const h: Vec3 = [dot(A[0], n), dot(A[1], n), dot(A[2], n)];
  const m = Math.max(...h.map(Math.abs));
  return [h[0] / m, h[1] / m, h[2] / m];
}

/** Every primitive plane (h k l) with indices up to maxIndex, one of each +-pair. */
export function lowIndexPlanes(maxIndex: number): Vec3[] {
  return primitiveDirections(maxIndex).filter((h) => {
    const first = h.find((x) => x !== 0) as number;
    return first > 0;
  });
}

export interface PlaneMatch {
  readonly hkl: Vec3;
  /** Angle between u and the plane, degrees (0: u lies in the plane). */
  readonly angle_deg: number;
}

/**
 * Low-index planes (indices up to maxIndex) that contain the direction u
 * within tol_deg, sorted by the sum of |indices| and then by angle.
 */
export function planesContaining(l: Lattice, u_cart: Vec3, tol_deg: number, maxIndex = 3): PlaneMatch[] {
  const u = unit(u_cart);
  const out: PlaneMatch[] = [];
  for (const h of lowIndexPlanes(maxIndex)) {
    const nC = unit(planeNormalToCartesian(l, h));
    const a = Math.asin(Math.min(1, Math.abs(dot(nC, u)))) / DEG;
    if (a <= tol_deg) out.push({ hkl: h, angle_deg: a });
  }
  const size = (h: Vec3) => Math.abs(h[0]) + Math.abs(h[1]) + Math.abs(h[2]);
  return out.sort((p, q) => size(p.hkl) - size(q.hkl) || p.angle_deg - q.angle_deg);
}

/** The low-index plane (indices up to maxIndex) whose normal is closest to n, with the angle between the normals. */
export function nearestPlane(l: Lattice, n_cart: Vec3, maxIndex = 3): PlaneMatch {
  const n = unit(n_cart);
  let best: PlaneMatch | null = null;
  for (const h of lowIndexPlanes(maxIndex)) {
    const c = Math.abs(dot(unit(planeNormalToCartesian(l, h)), n));
    const a = Math.acos(Math.min(1, c)) / DEG;
    const size = Math.abs(h[0]) + Math.abs(h[1]) + Math.abs(h[2]);
    const bs = best === null ? Infinity : Math.abs(best.hkl[0]) + Math.abs(best.hkl[1]) + Math.abs(best.hkl[2]);
    if (best === null || a < best.angle_deg - 0.01 || (Math.abs(a - best.angle_deg) <= 0.01 && size < bs)) best = { hkl: h, angle_deg: a };
  }
  return best as PlaneMatch;
}

/** The angular uncertainty (degrees, one sigma) of a function of u, by propagating the fit's covariance numerically. */
export function propagate(fit: TraceFit, f: (u: Vec3) => number): number {
  const h = 1e-5;
  let s2 = 0;
  const sig = [fit.sigmaMajor_deg * DEG, fit.sigmaMinor_deg * DEG];
  fit.axes.forEach((ax, k) => {
    const up = unit(add(fit.u_cart, scale(ax, h)));
    const dn = unit(sub(fit.u_cart, scale(ax, h)));
    const d = (f(up) - f(dn)) / (2 * h);
    s2 += (d * sig[k]) ** 2;
  });
  return Math.sqrt(s2);
}

/**
 * What `identify` (or a scenario) can take as the starting line direction:
 * u in 3-index lattice units rounded to 4 decimals (largest |index| 1), and
 * the half-angle of the cone to search within: twice the one-sigma cone, at
 * least 1 degree.
 */
export function startingLine(fit: TraceFit): { readonly line: Vec3; readonly cone_deg: number } {
  const r = (x: number) => Math.round(x * 1e4) / 1e4 + 0;
  return { line: [r(fit.u_lattice[0]), r(fit.u_lattice[1]), r(fit.u_lattice[2])], cone_deg: Math.max(1, 2 * fit.cone_deg) };
}
