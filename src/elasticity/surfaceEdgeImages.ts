/**
 * Isotropic half-space images of the edge component of a straight dislocation
 * parallel to the foil surfaces (Head 1953, Proc. Phys. Soc. B 66, 793: an
 * image dislocation of opposite sign plus the extra terms that free the surface
 * of shear and normal traction). Written here with the complex potentials of
 * plane strain (Muskhelishvili 1953, Some Basic Problems of the Mathematical
 * Theory of Elasticity, ch. 5; mu = 1, kappa = 3 - 4 nu):
 *   2 mu (u_x + i u_y) = kappa phi(z) - z conj(phi'(z)) - conj(psi(z)),
 *   sigma_yy + i sigma_xy = Phi + conj(Phi) + conj(z) Phi' + Psi,   Phi = phi', Psi = psi'.
 * Frame: x = m.(r - P) with m = n x u (along the surface, across the line),
 * y = n.r the depth (material y > 0, free surface y = 0), line along u
 * (m, n, u right-handed), z = x + i y, the line at a = i d (d = n.P). The
 * infinite-medium edge dislocation is phi0 = gamma ln(z - a),
 * psi0 = conj(gamma) ln(z - a) - gamma conj(a) / (z - a) with
 * gamma = mu (b_x + i b_y) / (pi i (kappa + 1)) (the closed circuit right-handed
 * about u gives +b, FS/RH). The correction, analytic in y > 0 (its poles at
 * conj(a), outside the material), with w = z - conj(a):
 *   phi_c = alpha ln w + beta / w,   psi_c = delta ln w + epsilon / w + zeta / w^2,
 *   alpha = -gamma, beta = conj(gamma) (a - conj(a)), delta = -conj(gamma),
 *   epsilon = beta + gamma conj(a), zeta = beta conj(a),
 * obtained here by requiring sigma_yy + i sigma_xy = 0 on y = 0 term by term
 * (the coefficients of 1/(x - a)^k and 1/(x - conj(a))^k vanish separately);
 * alpha and delta are Head's image dislocation, beta, epsilon, zeta the extra
 * terms. Exact for the half-space; the tests check the traction by Hooke's law
 * and equilibrium by finite differences (test/elasticity/surfaceRelaxation.test.ts).
 *
 * The exit surface y = t gets the same construction in the frame turned by
 * pi about u (x' = -x, y' = t - y, b' = -b_edge); a turn by pi leaves the
 * 2 x 2 gradient unchanged and negates the displacement. As with the
 * anisotropic images (surfaceImagesStroh.ts), the two images here are added
 * independently (no repeated reflections): each frees its own surface exactly
 * and leaves a traction on the other. surfacePlateEdge.ts uses them as the
 * singular part of the exact plate correction and removes that leftover with
 * the strip solution; edgeHalfSpaceImages (both images alone) serves the tests.
 */
import { type Vec3, cross, dot, unit } from '../math/vec3.js';
import type { DisplacementField } from './field.js';

export interface EdgeImagesOptions {
  readonly b_nm: Vec3;
  readonly line: Vec3;
  readonly point_nm: Vec3;
  /** Unit foil normal; the foil is 0 <= r.n <= thickness_nm. */
  readonly normal: Vec3;
  readonly thickness_nm: number;
  readonly poissonRatio: number;
  /** Tests only: leave out the image of one surface ('entrance': only r.n = 0 is freed). */
  readonly only?: 'entrance' | 'exit';
}

/** The coefficients of one half-space image (complex numbers as re, im pairs; mu = 1). */
export interface HalfPlane {
  readonly kappa: number;
  /** Depth of the line below this surface. */
  readonly d: number;
  readonly aR: number; readonly aI: number; // alpha
  readonly bR: number; readonly bI: number; // beta
  readonly dR: number; readonly dI: number; // delta
  readonly eR: number; readonly eI: number; // epsilon
  readonly zR: number; readonly zI: number; // zeta
}

export function halfPlane(bx: number, by: number, d: number, nu: number): HalfPlane {
  const kappa = 3 - 4 * nu;
  // gamma = (bx + i by) / (pi i (kappa + 1)) = (by - i bx) / (pi (kappa + 1))
  const s = 1 / (Math.PI * (kappa + 1));
  const gR = by * s, gI = -bx * s;
  // a = i d, conj(a) = -i d, a - conj(a) = 2 i d
  const bR = 2 * d * gI, bI = 2 * d * gR; // conj(gamma) * 2 i d = (gR - i gI)(2 i d)
  // gamma conj(a) = (gR + i gI)(-i d) = gI d - i gR d
  const eR = bR + gI * d, eI = bI - gR * d;
  // beta conj(a) = (bR + i bI)(-i d) = bI d - i bR d
  const zR = bI * d, zI = -bR * d;
  return { kappa, d, aR: -gR, aI: -gI, bR, bI, dR: -gR, dI: gI, eR, eI, zR, zI };
}

/**
 * The 2 x 2 displacement gradient of one image at (x, y) (y the depth below its surface)
 * into G[0..3] = (u_x,x, u_x,y, u_y,x, u_y,y).
 */
export function halfPlaneGradient(h: HalfPlane, x: number, y: number, G: Float64Array): void {
  // w = z - conj(a) = x + i (y + d); 1/w, 1/w^2, 1/w^3
  const wR = x, wI = y + h.d;
  const m2 = 1 / (wR * wR + wI * wI);
  const i1R = wR * m2, i1I = -wI * m2;
  const i2R = i1R * i1R - i1I * i1I, i2I = 2 * i1R * i1I;
  const i3R = i2R * i1R - i2I * i1I, i3I = i2R * i1I + i2I * i1R;
  // Phi = alpha/w - beta/w^2; Phi' = -alpha/w^2 + 2 beta/w^3; Psi = delta/w - epsilon/w^2 - 2 zeta/w^3
  const PR = h.aR * i1R - h.aI * i1I - (h.bR * i2R - h.bI * i2I);
  const PI = h.aR * i1I + h.aI * i1R - (h.bR * i2I + h.bI * i2R);
  const QR = -(h.aR * i2R - h.aI * i2I) + 2 * (h.bR * i3R - h.bI * i3I);
  const QI = -(h.aR * i2I + h.aI * i2R) + 2 * (h.bR * i3I + h.bI * i3R);
  const SR = h.dR * i1R - h.dI * i1I - (h.eR * i2R - h.eI * i2I) - 2 * (h.zR * i3R - h.zI * i3I);
  const SI = h.dR * i1I + h.dI * i1R - (h.eR * i2I + h.eI * i2R) - 2 * (h.zR * i3I + h.zI * i3R);
  // z conj(Phi'), z = x + i y
  const zqR = x * QR + y * QI, zqI = y * QR - x * QI;
  // dD/dx = kappa Phi - conj(Phi) - z conj(Phi') - conj(Psi); dD/dy = i (kappa Phi - conj(Phi) + z conj(Phi') + conj(Psi)); D = 2 u
  const k = h.kappa;
  const cR = k * PR - PR, cI = k * PI + PI; // kappa Phi - conj(Phi)
  const xR = cR - zqR - SR, xI = cI - zqI + SI;
  const yR = cR + zqR + SR, yI = cI + zqI - SI;
  G[0] = 0.5 * xR; // u_x,x
  G[2] = 0.5 * xI; // u_y,x
  G[1] = -0.5 * yI; // u_x,y = Re(i Y)
  G[3] = 0.5 * yR; // u_y,y = Im(i Y)
}

/** The displacement (u_x, u_y) of one image at (x, y) into U[0..1]. */
export function halfPlaneDisplacement(h: HalfPlane, x: number, y: number, U: Float64Array): void {
  const wR = x, wI = y + h.d; // wI > 0 in the material: arg w in (0, pi), no branch cut crossed
  const m2 = 1 / (wR * wR + wI * wI);
  const i1R = wR * m2, i1I = -wI * m2;
  const i2R = i1R * i1R - i1I * i1I, i2I = 2 * i1R * i1I;
  const LR = 0.5 * Math.log(wR * wR + wI * wI), LI = Math.atan2(wI, wR);
  // phi = alpha L + beta/w; Phi = alpha/w - beta/w^2; psi = delta L + epsilon/w + zeta/w^2
  const fR = h.aR * LR - h.aI * LI + h.bR * i1R - h.bI * i1I;
  const fI = h.aR * LI + h.aI * LR + h.bR * i1I + h.bI * i1R;
  const PR = h.aR * i1R - h.aI * i1I - (h.bR * i2R - h.bI * i2I);
  const PI = h.aR * i1I + h.aI * i1R - (h.bR * i2I + h.bI * i2R);
  const sR = h.dR * LR - h.dI * LI + h.eR * i1R - h.eI * i1I + h.zR * i2R - h.zI * i2I;
  const sI = h.dR * LI + h.dI * LR + h.eR * i1I + h.eI * i1R + h.zR * i2I + h.zI * i2R;
  // D = kappa phi - z conj(Phi) - conj(psi)
  const zpR = x * PR + y * PI, zpI = y * PR - x * PI;
  U[0] = 0.5 * (h.kappa * fR - zpR - sR);
  U[1] = 0.5 * (h.kappa * fI - zpI + sI);
}

/** The correction field of the edge component (b - (b.u) u) for both surfaces (or one, `only`). */
export function edgeHalfSpaceImages(o: EdgeImagesOptions): DisplacementField {
  const u = unit(o.line);
  const n = unit(o.normal);
  const m = cross(n, u);
  const t = o.thickness_nm;
  const bx = dot(o.b_nm, m), by = dot(o.b_nm, n);
  const xi0 = dot(o.point_nm, m);
  const d = dot(o.point_nm, n);
  const top = o.only === 'exit' ? null : halfPlane(bx, by, d, o.poissonRatio);
  const bottom = o.only === 'entrance' ? null : halfPlane(-bx, -by, t - d, o.poissonRatio);
  const [m0, m1, m2] = m;
  const [n0, n1, n2] = n;
  const G = new Float64Array(4);
  const H = new Float64Array(4);
  // the summed 2 x 2 gradient (in the m, n frame) into H
  const local = (px: number, py: number, pz: number): void => {
    const x = px * m0 + py * m1 + pz * m2 - xi0;
    const y = px * n0 + py * n1 + pz * n2;
    H[0] = 0; H[1] = 0; H[2] = 0; H[3] = 0;
    if (top !== null) {
      halfPlaneGradient(top, x, y, G);
      H[0] += G[0]; H[1] += G[1]; H[2] += G[2]; H[3] += G[3];
    }
    if (bottom !== null) {
      halfPlaneGradient(bottom, -x, t - y, G);
      H[0] += G[0]; H[1] += G[1]; H[2] += G[2]; H[3] += G[3];
    }
  };
  const U = new Float64Array(2);
  return {
    displacement(out, px, py, pz) {
      const x = px * m0 + py * m1 + pz * m2 - xi0;
      const y = px * n0 + py * n1 + pz * n2;
      let ux = 0, uy = 0;
      if (top !== null) {
        halfPlaneDisplacement(top, x, y, U);
        ux += U[0];
        uy += U[1];
      }
      if (bottom !== null) {
        halfPlaneDisplacement(bottom, -x, t - y, U);
        ux -= U[0];
        uy -= U[1];
      }
      out[0] = ux * m0 + uy * n0;
      out[1] = ux * m1 + uy * n1;
      out[2] = ux * m2 + uy * n2;
    },
    gradient(out, px, py, pz) {
      local(px, py, pz);
      for (let i = 0; i < 3; i++) {
        const mi = m[i], ni = n[i];
        // row i: mi (H00 m^T + H01 n^T) + ni (H10 m^T + H11 n^T)
        const a = mi * H[0] + ni * H[2];
        const b = mi * H[1] + ni * H[3];
        out[3 * i] = a * m0 + b * n0;
        out[3 * i + 1] = a * m1 + b * n1;
        out[3 * i + 2] = a * m2 + b * n2;
      }
    },
    directional(g, k) {
      const gm = g[0] * m0 + g[1] * m1 + g[2] * m2;
      const gn = g[0] * n0 + g[1] * n1 + g[2] * n2;
      const km = k[0] * m0 + k[1] * m1 + k[2] * m2;
      const kn = k[0] * n0 + k[1] * n1 + k[2] * n2;
      if ((gm === 0 && gn === 0) || (km === 0 && kn === 0)) return () => 0;
      return (px, py, pz) => {
        local(px, py, pz);
        return gm * (H[0] * km + H[1] * kn) + gn * (H[2] * km + H[3] * kn);
      };
    },
  };
}
