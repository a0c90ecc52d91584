/**
 * Closed planar polygon dislocation loop in an isotropic infinite medium, by
 * Burgers' formula (Hirth & Lothe 1982, Theory of Dislocations, ch. 4):
 *
 *   u(r) = -(b / 4pi) Omega(r) - (1/4pi) oint (b x dl') / R
 *          + 1 / (8 pi (1 - nu)) grad_r oint [b x (r' - r)] . dl' / R,      R = |r' - r|,
 *
 * Omega(r) = int_S n.(r - r') / |r - r'|^3 dA' the solid angle of the loop's
 * plane polygon S, with n the normal right-handed about the line direction
 * (the vertex order). With this sign a right-handed circuit about the line
 * closes to +b (FS/RH, physics.md section 5): crossing the polygon along +n
 * the displacement drops by b (u(+n side) - u(-n side) = -b), as for a
 * straight line's cut (crossing in the sense u x c, R drops by b). So a loop
 * whose vertices run counterclockwise about n has b.n > 0 for a vacancy loop
 * (the crystal on either side moves towards the removed layer) and b.n < 0 for
 * an interstitial loop.
 *
 * Every line integral is a closed form per straight segment A -> B (unit t,
 * length l): with rho = r' - r, sigma = rho.t, rho_perp the part of rho_A
 * normal to t, d^2 = |rho_perp|^2,
 *   J1 = int ds / R     = ln((R_B + sigma_B) / (R_A + sigma_A)),
 *   J3 = int ds / R^3   = [sigma / (d^2 R)]_A^B,
 *   K5 = int ds / R^5   = [sigma (2 sigma^2 + 3 d^2) / (3 d^4 R^3)]_A^B,
 * each written in a form free of cancellation for points near a segment's
 * extension (see `segment` below); grad Omega = sum (t x rho_A) J3 (the
 * Biot-Savart form), so the gradient needs no surface integral. Omega itself
 * (displacement only, never on the hot path) is the sum of the solid angles
 * of the triangles (centroid, A, B) by the Van Oosterom & Strackee (1983)
 * formula.
 *
 * Core. Every d^2 above is replaced within 2 rc of the segment (distance
 * delta from the segment, not from its infinite line) by
 *   q = d^2 + rc^2 (1 - delta^2 / rm^2)^3,   rm = 2 rc,
 * the same regularisation as the straight lines (straightDislocation.ts):
 * outside 2 rc of every segment the field is the singular elastic one, inside
 * it is finite. Omega is not smoothed (the renderer never uses it: it applies
 * the jump b across the polygon as an exact phase step), so `displacement`
 * keeps the exact jump and `gradient` is the smoothed derivative.
 *
 * Far field. Beyond FAR_LOOP_RADII loop radii from the vertex centroid,
 * `gradient` and `directional` use the infinitesimal loop of the same area
 * vector (Kroupa 1960), which costs a few dozen operations instead of a pass
 * over the sides; `displacement` is always exact.
 */
import { type Vec3, norm } from '../math/vec3.js';
import { InputError } from '../errors.js';
import { type DisplacementField, withDirectional } from './field.js';
import { coreRadius, nonZeroVec3, poisson } from './checks.js';

export interface LoopFieldOptions {
  /** Cartesian Burgers vector (nm), FS/RH about the line direction given by the vertex order. */
  readonly b_nm: Vec3;
  /** Vertices of the closed plane polygon (Cartesian nm, x0 y0 z0 x1 y1 z1 ...), in the order of the line direction; at least 3. */
  readonly vertices_nm: readonly number[];
  readonly poissonRatio: number;
  /** Core radius rc (nm), > 0; default |b|. */
  readonly coreRadius_nm?: number;
  /**
   * Beyond this many loop radii (largest vertex distance from the vertex centroid) `gradient` and
   * `directional` use the infinitesimal-loop (dipole) field; default FAR_LOOP_RADII. Infinity: always exact.
   */
  readonly farRadii?: number;
}

/**
 * Default switch to the dipole field, in loop radii. Just beyond 8 radii the dipole gradient differs from
 * the polygon's by < 2 % of its size for a circle and < 7 % for an irregular polygon (the first neglected
 * term falls as R/r there, as (R/r)^2 for a centrally symmetric loop; test/elasticity/loopField.test.ts),
 * where the gradient itself has fallen to about 1/500 of its size at one radius.
 */
export const FAR_LOOP_RADII = 8;

const FOUR_PI = 4 * Math.PI;

/**
 * Number of sides of the polygon that stands for a circle of radius r (nm) in
 * an image of pixel size p (nm): the smallest N for which the polygon's
 * sagitta r (1 - cos(pi/N)) is at most p / 8, rounded up to an even number
 * (so that the polygon keeps the circle's mirror planes through the centre
 * normal to its first vertex direction and its inversion symmetry), clamped
 * to 12 .. 180.
 */
export function circleSides(radius_nm: number, pixel_nm: number): number {
  const eps = pixel_nm / 8;
  const c = 1 - eps / radius_nm;
  const n = c <= -1 ? 12 : Math.ceil(Math.PI / Math.acos(Math.max(-1, c)));
  return Math.min(180, Math.max(12, n + (n % 2)));
}

/**
 * Vertices (flat, Cartesian nm) of the regular N-gon standing for a circle of
 * radius r about `centre` in the plane spanned by the unit vectors e1, e2,
 * counterclockwise about e1 x e2. The vertices lie on the radius
 * r sqrt(2 pi / (N sin(2 pi / N))), so that the polygon's area is pi r^2
 * (the far field, set by b.n times the area, is the circle's).
 */
export function circleVertices(centre: Vec3, e1: Vec3, e2: Vec3, radius_nm: number, sides: number): number[] {
  const rv = radius_nm * Math.sqrt((2 * Math.PI) / (sides * Math.sin((2 * Math.PI) / sides)));
  const out: number[] = [];
  for (let i = 0; i < sides; i++) {
    const a = (2 * Math.PI * i) / sides;
    const c = rv * Math.cos(a);
    const s = rv * Math.sin(a);
    out.push(centre[0] + c * e1[0] + s * e2[0], centre[1] + c * e1[1] + s * e2[1], centre[2] + c * e1[2] + s * e2[2]);
  }
  return out;
}

/** Area vector (1/2) sum v_i x v_(i+1) of a closed polygon (Cartesian nm^2): normal right-handed about the vertex order. */
export function polygonAreaVector(v: readonly number[]): Vec3 {
  const n = v.length / 3;
  let ax = 0, ay = 0, az = 0;
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    const x1 = v[3 * i], y1 = v[3 * i + 1], z1 = v[3 * i + 2];
    const x2 = v[3 * j], y2 = v[3 * j + 1], z2 = v[3 * j + 2];
    ax += y1 * z2 - z1 * y2;
    ay += z1 * x2 - x1 * z2;
    az += x1 * y2 - y1 * x2;
  }
  return [ax / 2, ay / 2, az / 2];
}

// per-segment scratch slots (see `segment`)
const S_RAX = 0, S_RAY = 1, S_RAZ = 2, S_SA = 3, S_Q = 4, S_RA = 5, S_RB = 6, S_J1 = 7, S_J3 = 8, S_K5 = 9, S_P = 10, S_Q5 = 11;

export function loopField(opts: LoopFieldOptions): DisplacementField {
  const b = nonZeroVec3(opts.b_nm, 'loop b_nm');
  const nu = poisson(opts.poissonRatio, 'poissonRatio');
  const v = opts.vertices_nm;
  if (v.length < 9 || v.length % 3 !== 0 || !v.every((x) => Number.isFinite(x))) {
    throw new InputError('loop vertices_nm must hold at least three points of three finite numbers each.');
  }
  const rc = coreRadius(opts.coreRadius_nm, norm(b), 'loop coreRadius_nm');
  const n = v.length / 3;
  const [bx, by, bz] = b;
  // segments: start A, unit t, length l, c = t x b
  const ax = new Float64Array(n), ay = new Float64Array(n), az = new Float64Array(n);
  const tx = new Float64Array(n), ty = new Float64Array(n), tz = new Float64Array(n);
  const len = new Float64Array(n);
  const cx = new Float64Array(n), cy = new Float64Array(n), cz = new Float64Array(n);
  let gx = 0, gy = 0, gz = 0; // centroid of the vertices (apex of the Van Oosterom-Strackee fan)
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    ax[i] = v[3 * i];
    ay[i] = v[3 * i + 1];
    az[i] = v[3 * i + 2];
    const dx = v[3 * j] - ax[i], dy = v[3 * j + 1] - ay[i], dz = v[3 * j + 2] - az[i];
    const l = Math.hypot(dx, dy, dz);
    if (!(l > 0)) throw new InputError('loop vertices_nm has two equal consecutive points; remove the repeated vertex.');
    len[i] = l;
    tx[i] = dx / l;
    ty[i] = dy / l;
    tz[i] = dz / l;
    cx[i] = ty[i] * bz - tz[i] * by;
    cy[i] = tz[i] * bx - tx[i] * bz;
    cz[i] = tx[i] * by - ty[i] * bx;
    gx += ax[i] / n;
    gy += ay[i] / n;
    gz += az[i] / n;
  }
  // far field: the infinitesimal loop of area vector A at the centroid (Kroupa 1960),
  // u_i = C [(1 - 2 nu)(b_i (A.x) + A_i (b.x) - (b.A) x_i) / r^3 + 3 x_i (b.x)(A.x) / r^5],  C = -1 / (8 pi (1 - nu))
  const [Ax, Ay, Az] = polygonAreaVector(v);
  let reach2 = 0;
  for (let i = 0; i < n; i++) reach2 = Math.max(reach2, (ax[i] - gx) ** 2 + (ay[i] - gy) ** 2 + (az[i] - gz) ** 2);
  const far = opts.farRadii ?? FAR_LOOP_RADII;
  const far2 = far === Infinity ? Infinity : far * far * reach2;
  const Cd = -1 / (8 * Math.PI * (1 - nu));
  const oneM2nu = 1 - 2 * nu;
  const bA = bx * Ax + by * Ay + bz * Az;
  const bv = Float64Array.of(bx, by, bz);
  const Av = Float64Array.of(Ax, Ay, Az);
  const xv = new Float64Array(3);
  const c2 = 1 / (8 * Math.PI * (1 - nu));
  const cA = 1 / FOUR_PI - c2;
  const rc2 = rc * rc;
  const rm2 = 4 * rc2;
  const w = new Float64Array(12);
  // scratch of `gradient` (no allocation per point)
  const t = new Float64Array(3), c = new Float64Array(3), rA = new Float64Array(3);
  const rp = new Float64Array(3), rB = new Float64Array(3), o = new Float64Array(3);

  /**
   * The closed forms of segment i seen from (x, y, z) into w: rho_A, sigma_A, q (smoothed d^2), R_A, R_B,
   * J1, J3, K5, P = 1/R_A - 1/R_B, Q5 = (1/R_A^3 - 1/R_B^3)/3. The forms avoid the cancellation of the
   * textbook antiderivatives near a segment's extension: R + sigma for sigma < 0 as q / (R - sigma), and
   * [f]_A^B for the odd antiderivatives f(sigma) = sign(sigma) (C / q^m + h(sigma)) with the constant
   * C / q^m cancelling analytically when both ends lie on the same side.
   */
  const segment = (i: number, x: number, y: number, z: number, withLog: boolean, knownRA: number): void => {
    const rx = ax[i] - x, ry = ay[i] - y, rz = az[i] - z;
    const sA = rx * tx[i] + ry * ty[i] + rz * tz[i];
    const sB = sA + len[i];
    const r2 = rx * rx + ry * ry + rz * rz;
    let d2 = r2 - sA * sA;
    if (d2 < 0) d2 = 0;
    const delta2 = d2 + (sA > 0 ? sA * sA : sB < 0 ? sB * sB : 0);
    let q = d2;
    if (delta2 < rm2) {
      const o = 1 - delta2 / rm2;
      q = d2 + rc2 * o * o * o;
    }
    // outside the core R_A = |rho_A| (the previous segment's R_B when the caller passes it)
    const RA = q === d2 ? (knownRA === knownRA ? knownRA : Math.sqrt(r2)) : Math.sqrt(sA * sA + q);
    const RB = Math.sqrt(sB * sB + q);
    let J1 = 0;
    if (withLog) {
      const argA = sA >= 0 ? RA + sA : q / (RA - sA);
      const argB = sB >= 0 ? RB + sB : q / (RB - sB);
      J1 = Math.log(argB / argA);
    }
    const aA = Math.abs(sA), aB = Math.abs(sB);
    const hA = -1 / (RA * (aA + RA));
    const hB = -1 / (RB * (aB + RB));
    const RA3 = RA * RA * RA, RB3 = RB * RB * RB;
    const gA = -(3 * sA * sA + 4 * q) / (3 * RA3 * (aA * (2 * sA * sA + 3 * q) + 2 * RA3));
    const gB = -(3 * sB * sB + 4 * q) / (3 * RB3 * (aB * (2 * sB * sB + 3 * q) + 2 * RB3));
    let J3: number, K5: number;
    if (sA >= 0) {
      J3 = hB - hA;
      K5 = gB - gA;
    } else if (sB < 0) {
      J3 = hA - hB;
      K5 = gA - gB;
    } else {
      J3 = 2 / q + hB + hA;
      K5 = 4 / (3 * q * q) + gB + gA;
    }
    const iA = 1 / RA, iB = 1 / RB;
    w[S_RAX] = rx;
    w[S_RAY] = ry;
    w[S_RAZ] = rz;
    w[S_SA] = sA;
    w[S_Q] = q === d2 ? -1 : q; // -1: outside every core, R_B is |rho_B|
    w[S_RA] = RA;
    w[S_RB] = RB;
    w[S_J1] = J1;
    w[S_J3] = J3;
    w[S_K5] = K5;
    w[S_P] = iA - iB;
    w[S_Q5] = (iA * iA * iA - iB * iB * iB) / 3;
  };

  /** Solid angle Omega(r) of the polygon (sign: +2 pi just on the +n side), Van Oosterom & Strackee triangles from the centroid. */
  const solidAngle = (x: number, y: number, z: number): number => {
    const px = gx - x, py = gy - y, pz = gz - z;
    const pl = Math.hypot(px, py, pz);
    let om = 0;
    for (let i = 0; i < n; i++) {
      const j = (i + 1) % n;
      const ux = ax[i] - x, uy = ay[i] - y, uz = az[i] - z;
      const vx = ax[j] - x, vy = ay[j] - y, vz = az[j] - z;
      const ul = Math.hypot(ux, uy, uz), vl = Math.hypot(vx, vy, vz);
      // triple product u . (v x p)
      const num = ux * (vy * pz - vz * py) + uy * (vz * px - vx * pz) + uz * (vx * py - vy * px);
      const den = ul * vl * pl + (ux * vx + uy * vy + uz * vz) * pl + (ux * px + uy * py + uz * pz) * vl + (vx * px + vy * py + vz * pz) * ul;
      om -= 2 * Math.atan2(num, den);
    }
    return om;
  };

  return withDirectional({
    displacement(out, x, y, z) {
      const f = -solidAngle(x, y, z) / FOUR_PI;
      let ux = f * bx, uy = f * by, uz = f * bz;
      for (let i = 0; i < n; i++) {
        segment(i, x, y, z, true, NaN);
        const sA = w[S_SA];
        const px = w[S_RAX] - sA * tx[i], py = w[S_RAY] - sA * ty[i], pz = w[S_RAZ] - sA * tz[i];
        const cr = cx[i] * w[S_RAX] + cy[i] * w[S_RAY] + cz[i] * w[S_RAZ];
        const a = cA * w[S_J1];
        const e = c2 * cr * w[S_J3];
        const h = c2 * cr * w[S_P];
        ux += a * cx[i] + e * px + h * tx[i];
        uy += a * cy[i] + e * py + h * ty[i];
        uz += a * cz[i] + e * pz + h * tz[i];
      }
      out[0] = ux;
      out[1] = uy;
      out[2] = uz;
    },
    gradient(out, x, y, z) {
      const X = x - gx, Y = y - gy, Z = z - gz;
      const r2 = X * X + Y * Y + Z * Z;
      if (r2 > far2) {
        // d_l u_i = C [(1-2nu)((b_i A_l + A_i b_l - (b.A) d_il) / r^3 - 3 (b_i a + A_i beta - (b.A) x_i) x_l / r^5)
        //              + 3 (d_il beta a + x_i b_l a + x_i beta A_l) / r^5 - 15 x_i beta a x_l / r^7]
        const ir2 = 1 / r2;
        const ir3 = ir2 / Math.sqrt(r2);
        const ir5 = ir3 * ir2;
        const ir7 = ir5 * ir2;
        const a = Ax * X + Ay * Y + Az * Z;
        const be = bx * X + by * Y + bz * Z;
        xv[0] = X;
        xv[1] = Y;
        xv[2] = Z;
        for (let i = 0; i < 3; i++) {
          const w1 = bv[i] * a + Av[i] * be - bA * xv[i];
          for (let l = 0; l < 3; l++) {
            const d = i === l ? 1 : 0;
            out[3 * i + l] =
              Cd *
              (oneM2nu * ((bv[i] * Av[l] + Av[i] * bv[l] - bA * d) * ir3 - 3 * w1 * xv[l] * ir5) +
                3 * (d * be * a + xv[i] * bv[l] * a + xv[i] * be * Av[l]) * ir5 -
                15 * xv[i] * be * a * xv[l] * ir7);
          }
        }
        return;
      }
      for (let k = 0; k < 9; k++) out[k] = 0;
      for (let i = 0; i < n; i++) {
        segment(i, x, y, z, false, NaN);
        t[0] = tx[i]; t[1] = ty[i]; t[2] = tz[i];
        c[0] = cx[i]; c[1] = cy[i]; c[2] = cz[i];
        rA[0] = w[S_RAX]; rA[1] = w[S_RAY]; rA[2] = w[S_RAZ];
        const sA = w[S_SA];
        const J3 = w[S_J3], K5 = w[S_K5], P = w[S_P], Q5 = w[S_Q5], RA = w[S_RA], RB = w[S_RB];
        for (let a = 0; a < 3; a++) {
          rp[a] = rA[a] - sA * t[a];
          rB[a] = rA[a] + len[i] * t[a];
        }
        const iA3 = 1 / (RA * RA * RA), iB3 = 1 / (RB * RB * RB);
        const cr = c[0] * rA[0] + c[1] * rA[1] + c[2] * rA[2];
        // grad Omega of this segment: (t x rho_A) J3
        o[0] = (t[1] * rA[2] - t[2] * rA[1]) * J3;
        o[1] = (t[2] * rA[0] - t[0] * rA[2]) * J3;
        o[2] = (t[0] * rA[1] - t[1] * rA[0]) * J3;
        for (let a = 0; a < 3; a++) {
          for (let j = 0; j < 3; j++) {
            const dJ1 = rp[j] * J3 + t[j] * P;
            const dJ3 = 3 * (rp[j] * K5 + t[j] * Q5);
            const dP = rA[j] * iA3 - rB[j] * iB3;
            const dPerp = -((a === j ? 1 : 0) - t[a] * t[j]);
            out[3 * a + j] +=
              (-b[a] * o[j]) / FOUR_PI +
              cA * c[a] * dJ1 +
              c2 * (-c[j] * (rp[a] * J3 + t[a] * P) + cr * (dPerp * J3 + rp[a] * dJ3 + t[a] * dP));
          }
        }
      }
    },
    directionalAt(gv, kv) {
      const [g0, g1, g2] = gv;
      const [k0, k1, k2] = kv;
      const gb = (g0 * bx + g1 * by + g2 * bz) / FOUR_PI;
      const gk = g0 * k0 + g1 * k1 + g2 * k2;
      // per-segment constants
      const gc = new Float64Array(n), kc = new Float64Array(n), gt = new Float64Array(n), kt = new Float64Array(n);
      const ktx = new Float64Array(n), kty = new Float64Array(n), ktz = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        gc[i] = g0 * cx[i] + g1 * cy[i] + g2 * cz[i];
        kc[i] = k0 * cx[i] + k1 * cy[i] + k2 * cz[i];
        gt[i] = g0 * tx[i] + g1 * ty[i] + g2 * tz[i];
        kt[i] = k0 * tx[i] + k1 * ty[i] + k2 * tz[i];
        ktx[i] = k1 * tz[i] - k2 * ty[i];
        kty[i] = k2 * tx[i] - k0 * tz[i];
        ktz[i] = k0 * ty[i] - k1 * tx[i];
      }
      // far field: g.(grad u).k of the dipole
      const gbd = g0 * bx + g1 * by + g2 * bz;
      const gA = g0 * Ax + g1 * Ay + g2 * Az;
      const kA = k0 * Ax + k1 * Ay + k2 * Az;
      const kb = k0 * bx + k1 * by + k2 * bz;
      return (p) => {
        const x = p[0], y = p[1], z = p[2];
        const X = x - gx, Y = y - gy, Z = z - gz;
        const r2 = X * X + Y * Y + Z * Z;
        if (r2 > far2) {
          const ir2 = 1 / r2;
          const ir3 = ir2 / Math.sqrt(r2);
          const ir5 = ir3 * ir2;
          const a = Ax * X + Ay * Y + Az * Z;
          const be = bx * X + by * Y + bz * Z;
          const ga = g0 * X + g1 * Y + g2 * Z;
          const xk = k0 * X + k1 * Y + k2 * Z;
          const lin = gbd * a + gA * be - bA * ga;
          const cub = ga * be * a;
          p[3] =
            Cd *
            (oneM2nu * ((gbd * kA + gA * kb - bA * gk) * ir3 - 3 * lin * xk * ir5) +
              3 * (gk * be * a + ga * kb * a + ga * be * kA) * ir5 -
              15 * cub * xk * ir5 * ir2);
          return;
        }
        let s = 0;
        let carry = NaN; // |rho| at the start of segment i when the previous segment lay outside every core
        for (let i = 0; i < n; i++) {
          segment(i, x, y, z, false, carry);
          carry = w[S_Q] < 0 ? w[S_RB] : NaN;
          const rx = w[S_RAX], ry = w[S_RAY], rz = w[S_RAZ];
          const sA = w[S_SA];
          const J3 = w[S_J3], P = w[S_P];
          const RA = w[S_RA], RB = w[S_RB];
          const gA = g0 * rx + g1 * ry + g2 * rz;
          const kA = k0 * rx + k1 * ry + k2 * rz;
          const cr = cx[i] * rx + cy[i] * ry + cz[i] * rz;
          const gp = gA - sA * gt[i];
          const kp = kA - sA * kt[i];
          const kB = kA + len[i] * kt[i];
          const omega = (rx * ktx[i] + ry * kty[i] + rz * ktz[i]) * J3; // k . grad Omega of the segment
          s +=
            -gb * omega +
            cA * gc[i] * (kp * J3 + kt[i] * P) +
            c2 *
              (-kc[i] * (gp * J3 + gt[i] * P) +
                cr *
                  (-(gk - gt[i] * kt[i]) * J3 +
                    3 * gp * (kp * w[S_K5] + kt[i] * w[S_Q5]) +
                    gt[i] * (kA / (RA * RA * RA) - kB / (RB * RB * RB))));
        }
        p[3] = s;
      };
    },
  });
}

/** The segments of a loop polygon as (start point, unit direction, length), for the core geometry. */
export function loopSegments(vertices_nm: readonly number[]): { p: Vec3; u: Vec3; length: number }[] {
  const n = vertices_nm.length / 3;
  const out: { p: Vec3; u: Vec3; length: number }[] = [];
  for (let i = 0; i < n; i++) {
    const j = (i + 1) % n;
    const p: Vec3 = [vertices_nm[3 * i], vertices_nm[3 * i + 1], vertices_nm[3 * i + 2]];
    const d: Vec3 = [vertices_nm[3 * j] - p[0], vertices_nm[3 * j + 1] - p[1], vertices_nm[3 * j + 2] - p[2]];
    const l = norm(d);
    out.push({ p, u: [d[0] / l, d[1] / l, d[2] / l], length: l });
  }
  return out;
}
