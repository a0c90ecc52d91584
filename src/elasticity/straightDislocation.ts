/**
 * Straight dislocation in an isotropic infinite medium (Hirth & Lothe 1982,
 * Theory of Dislocations, ch. 3), with a regularised core.
 *
 * Local frame: e3 = u (unit line direction), e1 along the edge component
 * b_e = b - (b.u)u (for a pure screw any unit vector perpendicular to u, see
 * below), e2 = e3 x e1. With x, y the coordinates of r - P on e1, e2,
 * rho^2 = x^2 + y^2, k = 1 / (4 (1 - nu)):
 *
 *   R1 = (|b_e|/2pi) [ theta + 2k x y / rho^2 ]
 *   R2 = -(|b_e|/2pi) [ (1 - 2nu) k ln(rho^2) + k (x^2 - y^2) / rho^2 ]
 *   R3 = (b.u / 2pi) theta
 *
 * Burgers convention (FS/RH, physics.md section 5): the closed line integral
 * of dR along a right-handed circuit about u is +b.
 *
 * Branch cut. theta jumps by 2pi on the half-plane {P + s u + t c, t > 0},
 * c = `cutDirection` (its component along u is dropped, which leaves the
 * half-plane unchanged). theta keeps the value of the usual polar angle from
 * e1 up to a multiple of 2pi, so a different cut changes R by 0 or +-b only.
 * Crossing the cut in the sense of u x c (right-handed about u) R drops by b:
 * R(P + t c - eps u x c) - R(P + t c + eps u x c) = b.
 * Default cut: the half-plane along -e1, i.e. theta = atan2(y, x) in (-pi, pi].
 * For a partial dislocation the cut must lie along the stacking fault it bounds.
 *
 * Core. The fields diverge at rho -> 0. With rc = `coreRadius_nm` (default
 * |b|) and rm = 2 rc, every rho^2 above (also inside ln and as the factor
 * f = rho^2/q multiplying theta) is replaced by
 *   q = rho^2 + rc^2 (1 - rho^2/rm^2)^3   for rho < rm,   q = rho^2 otherwise.
 * Outside rm = 2 rc the field is therefore exactly the singular one; inside it
 * is finite everywhere (on the line R = (-(|b_e|/2pi)(1-2nu)k ln rc^2) e2 and
 * grad R = 0) and continuous. Inside the core the jump of `displacement`
 * across the cut is b f(rho), growing from 0 on the line to b at rm (the
 * Burgers vector is spread over 2 rc, like a Peierls core).
 * `gradient` is the exact derivative of `displacement` outside rm. Inside rm
 * it leaves out the term theta grad f, which would jump across the cut: the
 * gradient used for imaging is then smooth everywhere (the angular part is
 * (-y, x)/q), so a column passing through the core sees a smooth beta' and
 * the adaptive integrator converges there as anywhere else.
 */
import { type Vec3, cross, dot, norm, scale, sub } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type DisplacementField, withDirectional } from './field.js';
import { coreRadius, finiteVec3, nonZeroVec3, poisson } from './checks.js';

export interface StraightDislocationOptions {
  /** Cartesian Burgers vector (nm), FS/RH about `line`. */
  readonly b_nm: Vec3;
  /** Line direction u, any length. */
  readonly line: Vec3;
  /** A point on the line (nm). */
  readonly point_nm: Vec3;
  readonly poissonRatio: number;
  /**
   * Direction c (perpendicular to u; a component along u is ignored) of the
   * half-plane {P + s u + t c, t > 0} where theta jumps by 2pi. Default: -e1.
   */
  readonly cutDirection?: Vec3;
  /** Core radius rc (nm), > 0. Default |b|. The field is modified only within 2 rc of the line. */
  readonly coreRadius_nm?: number;
}

/** The local frame chosen for a dislocation (exported for tests and the imaging stage). */
export interface DislocationFrame {
  readonly e1: Vec3;
  readonly e2: Vec3;
  readonly e3: Vec3;
  /** |b_e| (nm). */
  readonly edge_nm: number;
  /** b.u (nm). */
  readonly screw_nm: number;
}

const TWO_PI = 2 * Math.PI;

/** Frame e1, e2, e3 of physics.md section 5 for Burgers vector b and line u. */
export function dislocationFrame(b: Vec3, line: Vec3): DislocationFrame {
  const e3 = scale(line, 1 / norm(line));
  const bs = dot(b, e3);
  const be = sub(b, scale(e3, bs));
  const beLen = norm(be);
  let e1: Vec3;
  let edge = beLen;
  if (beLen > 1e-12 * norm(b)) {
    e1 = scale(be, 1 / beLen);
  } else {
    // pure screw: e1 = the Cartesian axis least parallel to u, made perpendicular to u
    edge = 0;
    const a = Math.abs(e3[0]);
    const bb = Math.abs(e3[1]);
    const c = Math.abs(e3[2]);
    const axis: Vec3 = a <= bb && a <= c ? [1, 0, 0] : bb <= c ? [0, 1, 0] : [0, 0, 1];
    const p = sub(axis, scale(e3, dot(axis, e3)));
    e1 = scale(p, 1 / norm(p));
  }
  const e2 = cross(e3, e1);
  return { e1, e2, e3, edge_nm: edge, screw_nm: bs };
}

export function straightDislocation(opts: StraightDislocationOptions): DisplacementField {
  const b = nonZeroVec3(opts.b_nm, 'dislocation b_nm');
  const line = nonZeroVec3(opts.line, 'dislocation line');
  const P = finiteVec3(opts.point_nm, 'dislocation point_nm');
  const nu = poisson(opts.poissonRatio, 'poissonRatio');
  const bLen = norm(b);
  const rc = coreRadius(opts.coreRadius_nm, bLen, 'dislocation coreRadius_nm');
  const fr = dislocationFrame(b, line);
  const { e1, e2, e3 } = fr;

  // Cut: theta = phiD + atan2(yd, xd), d = -c, (xd, yd) = coordinates on d, u x d.
  let cosD = 1;
  let sinD = 0;
  if (opts.cutDirection !== undefined) {
    const c = nonZeroVec3(opts.cutDirection, 'dislocation cutDirection');
    const cp = sub(c, scale(e3, dot(c, e3)));
    if (!(norm(cp) > 1e-9 * norm(c))) {
      throw new InputError('dislocation cutDirection must not be parallel to the line; give a direction across the line, e.g. along the fault.');
    }
    const d = scale(cp, -1 / norm(cp));
    const phi = Math.atan2(dot(d, e2), dot(d, e1));
    cosD = Math.cos(phi);
    sinD = Math.sin(phi);
  }
  const phiD = Math.atan2(sinD, cosD);

  // constants
  const px = P[0], py = P[1], pz = P[2];
  const e1x = e1[0], e1y = e1[1], e1z = e1[2];
  const e2x = e2[0], e2y = e2[1], e2z = e2[2];
  const e3x = e3[0], e3y = e3[1], e3z = e3[2];
  const Be = fr.edge_nm / TWO_PI;
  const Bs = fr.screw_nm / TWO_PI;
  const k = 1 / (4 * (1 - nu));
  const Be2k = 2 * k * Be; // coefficient of x y / q in R1
  const Bek = k * Be; // coefficient in R2
  const lnC = 1 - 2 * nu; // coefficient of ln q inside the R2 bracket
  const rc2 = rc * rc;
  const rm2 = 4 * rc2;
  const rcm = rc2 / rm2; // rc^2/rm^2 = 1/4

  const theta = (lx: number, ly: number): number =>
    phiD + Math.atan2(-lx * sinD + ly * cosD, lx * cosD + ly * sinD);

  return withDirectional({
    displacement(out, x, y, z) {
      const dx = x - px, dy = y - py, dz = z - pz;
      const lx = e1x * dx + e1y * dy + e1z * dz;
      const ly = e2x * dx + e2y * dy + e2z * dz;
      const r2 = lx * lx + ly * ly;
      let q = r2;
      if (r2 < rm2) {
        const o = 1 - r2 / rm2;
        q = r2 + rc2 * o * o * o;
      }
      const tf = theta(lx, ly) * (r2 / q); // theta f
      const iq = 1 / q;
      const R1 = Be * tf + Be2k * lx * ly * iq;
      const R2 = -Bek * (lnC * Math.log(q) + (lx * lx - ly * ly) * iq);
      const R3 = Bs * tf;
      out[0] = e1x * R1 + e2x * R2 + e3x * R3;
      out[1] = e1y * R1 + e2y * R2 + e3y * R3;
      out[2] = e1z * R1 + e2z * R2 + e3z * R3;
    },
    gradient(out, x, y, z) {
      const dx = x - px, dy = y - py, dz = z - pz;
      const lx = e1x * dx + e1y * dy + e1z * dz;
      const ly = e2x * dx + e2y * dy + e2z * dz;
      const x2 = lx * lx, y2 = ly * ly;
      const r2 = x2 + y2;
      let q = r2;
      let m = 1; // dq/d(rho^2)
      if (r2 < rm2) {
        const o = 1 - r2 / rm2;
        q = r2 + rc2 * o * o * o;
        m = 1 - 3 * rcm * o * o;
      }
      const iq = 1 / q;
      const iq2 = iq * iq;
      // smooth angular part: f grad(theta) = (-y, x)/q; the term theta grad f (inside the core only) is left out
      const tx = -ly * iq;
      const ty = lx * iq;
      const dxy = x2 - y2;
      // local 3x2 block G_ab = dR_a / dx_b (b = x, y); nothing depends on the coordinate along u
      const g11 = Be * tx + Be2k * ly * (q - 2 * x2 * m) * iq2;
      const g12 = Be * ty + Be2k * lx * (q - 2 * y2 * m) * iq2;
      const g21 = -2 * Bek * lx * (lnC * m * iq + (q - dxy * m) * iq2);
      const g22 = -2 * Bek * ly * (lnC * m * iq - (q + dxy * m) * iq2);
      const g31 = Bs * tx;
      const g32 = Bs * ty;
      // Cartesian: grad R = sum_a e_a (x) (G_a1 e1 + G_a2 e2)
      const v1x = g11 * e1x + g12 * e2x, v1y = g11 * e1y + g12 * e2y, v1z = g11 * e1z + g12 * e2z;
      const v2x = g21 * e1x + g22 * e2x, v2y = g21 * e1y + g22 * e2y, v2z = g21 * e1z + g22 * e2z;
      const v3x = g31 * e1x + g32 * e2x, v3y = g31 * e1y + g32 * e2y, v3z = g31 * e1z + g32 * e2z;
      out[0] = e1x * v1x + e2x * v2x + e3x * v3x;
      out[1] = e1x * v1y + e2x * v2y + e3x * v3y;
      out[2] = e1x * v1z + e2x * v2z + e3x * v3z;
      out[3] = e1y * v1x + e2y * v2x + e3y * v3x;
      out[4] = e1y * v1y + e2y * v2y + e3y * v3y;
      out[5] = e1y * v1z + e2y * v2z + e3y * v3z;
      out[6] = e1z * v1x + e2z * v2x + e3z * v3x;
      out[7] = e1z * v1y + e2z * v2y + e3z * v3y;
      out[8] = e1z * v1z + e2z * v2z + e3z * v3z;
    },
    directionalAt(g, kv) {
      // g.G.k = sum_a (g.e_a) (G_a1 (k.e1) + G_a2 (k.e2)), the same local block as `gradient`
      const ga1 = g[0] * e1x + g[1] * e1y + g[2] * e1z;
      const ga2 = g[0] * e2x + g[1] * e2y + g[2] * e2z;
      const ga3 = g[0] * e3x + g[1] * e3y + g[2] * e3z;
      const k1 = kv[0] * e1x + kv[1] * e1y + kv[2] * e1z;
      const k2 = kv[0] * e2x + kv[1] * e2y + kv[2] * e2z;
      // coefficients of the local block entries
      const c1 = ga1 * Be + ga3 * Bs; // multiplies (tx k1 + ty k2)
      return (p) => {
        const x = p[0], y = p[1], z = p[2];
        const dx = x - px, dy = y - py, dz = z - pz;
        const lx = e1x * dx + e1y * dy + e1z * dz;
        const ly = e2x * dx + e2y * dy + e2z * dz;
        const x2 = lx * lx, y2 = ly * ly;
        const r2 = x2 + y2;
        let q = r2;
        let m = 1;
        if (r2 < rm2) {
          const o = 1 - r2 / rm2;
          q = r2 + rc2 * o * o * o;
          m = 1 - 3 * rcm * o * o;
        }
        const iq = 1 / q;
        const iq2 = iq * iq;
        const dxy = x2 - y2;
        const angular = (-ly * k1 + lx * k2) * iq;
        const e11 = Be2k * ly * (q - 2 * x2 * m) * iq2;
        const e12 = Be2k * lx * (q - 2 * y2 * m) * iq2;
        const g21 = -2 * Bek * lx * (lnC * m * iq + (q - dxy * m) * iq2);
        const g22 = -2 * Bek * ly * (lnC * m * iq - (q + dxy * m) * iq2);
        p[3] = c1 * angular + ga1 * (e11 * k1 + e12 * k2) + ga2 * (g21 * k1 + g22 * k2);
      };
    },
  });
}
