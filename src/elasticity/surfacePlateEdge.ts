/**
 * Exact isotropic plate correction of the edge component of a straight
 * dislocation parallel to the foil surfaces: the plane-strain field that,
 * added to the infinite-medium field, frees BOTH surfaces y = 0 and y = t of
 * traction (every point of them, however far from the line).
 *
 * Frame (as surfaceEdgeImages.ts): x = m.(r - P) with m = n x u across the line,
 * y = n.r the depth, line along u; mu = 1 (gradients are dimensionless), plane
 * strain, kappa = 3 - 4 nu. The screw component is not seen here (isotropic:
 * antiplane and plane strain decouple; surfaceRelaxation.ts adds its image series).
 *
 * Construction.
 * 1. The half-space image of each surface (Head 1953, surfaceEdgeImages.ts): it
 *    carries the whole near-surface singular structure of the correction (poles
 *    at distance d of the surface), frees its own surface exactly and leaves a
 *    traction on the OTHER surface, which is smooth on the scale of the foil
 *    thickness (its poles lie at least t from that surface).
 * 2. The residual: the traction-free strip 0 < y < t loaded with minus those two
 *    leftover tractions, by the Fourier transform in x (f^(k) = int f e^{-ikx} dx,
 *    f(x) = (1/pi) Re int_0^inf f^ e^{ikx} dk for real f). The leftover tractions
 *    are rational in x (complex potentials with poles below the line where they
 *    act), so their transforms are closed forms: 1/(x - p)^n with Im p = -q < 0
 *    has, for k > 0, the transform -2 pi i (-ik)^{n-1}/(n-1)! e^{-kq}.
 *    Airy stress function phi^(k, y): sigma_xx = phi'', sigma_yy = -k^2 phi,
 *    sigma_xy = -i k phi'; about the mid-plane eta = y - t/2 the symmetric part
 *    A cosh k eta + B eta sinh k eta and the antisymmetric part C sinh k eta + D eta cosh k eta,
 *    two unknowns each from the tractions on eta = +-t/2 (closed form, determinants
 *    (sinh kt + kt)/2 and (sinh kt - kt)/2). Strains by plane-strain Hooke's law;
 *    the rotation from compatibility, i k omega^ = i k eps^_xy - d eps^_xx/dy.
 * 3. k -> 0: a free plate with a dislocation inside is, far from the line, two
 *    rigid halves; the edge component across the line (b_x: an extra half-plane
 *    through part of the thickness) turns them against each other by the kink
 *      Delta omega = omega(+inf) - omega(-inf) = -6 b_x d (t - d) / t^3
 *    (d the depth of the line: Betti's reciprocity with the pure-bending state
 *    sigma_xx = M (y - t/2)/I, which is an exact plane-strain solution, gives exactly
 *    the beam-theory value; the component along n gives none). So omega^ has the pole
 *    -i Delta omega / k. It is subtracted in the form -i Delta omega e^{-k t}/k,
 *    whose inverse transform (Delta omega/pi) atan(x/t) is added back in closed
 *    form; the rest is analytic at k = 0 (the loads are e^{-kq} times polynomials,
 *    the strip's poles lie off the real axis) and is integrated by Gauss-Legendre
 *    panels up to k t = 36 (the integrand falls as e^{-k t}).
 *    Convention (rigid-body part): the Fourier inverse gives the two far halves
 *    rotated by +-Delta omega / 2 (no mean rotation; the rotation from b_x is odd
 *    in x, none at the line), and the displacement is fixed to 0 at the line
 *    itself. The renderer's background (perfect crystal at the scenario's s) thus
 *    holds at the line; far from it each half is perfect crystal tilted by
 *    +-Delta omega/2, which beta' = g.(grad R).k sees as a change of s (for a
 *    beam along n: -omega g.m).
 * 4. Tabulation: the residual's 2 x 2 gradient and its x, y and xy derivatives
 *    (all from the same transforms) on a grid |x| <= 6 t, 0 <= y <= t (spacing
 *    t/24 by t/24), bicubic Hermite interpolation. Beyond |x| = 6 t the field in a
 *    free strip has decayed to the rigid far state to e^{-4.2 |x|/t} (the
 *    Papkovich-Fadle eigenvalues of the strip, sinh z = -z at z = 4.21 + 2.25 i),
 *    so there the correction is minus the infinite field plus the rotation
 *    +-Delta omega / 2, in closed form. Interpolation error against the direct
 *    k integral: measured in test/elasticity/surfacePlateEdge.test.ts.
 *
 * The displacement (tests and tools; the renderer uses only the gradient, so it is
 * built on first use) is the images' closed form plus a bicubic Hermite table of
 * the residual's displacement whose derivatives are the gradient table and whose
 * values are its integral; beyond |x| = 6 t minus the line's displacement plus the
 * rotation -+kink/2 and a translation that meets the table; zero at the line.
 */
import { type Vec3, cross, dot, unit } from '../math/vec3.js';
import { gaussLegendre } from '../math/gaussLegendre.js';
import { type HermiteGrid, hermiteGrid } from '../math/hermiteGrid.js';
import { type DirectionalProbe, type DisplacementField, withDirectional } from './field.js';
import { type EdgeImagesOptions, type HalfPlane, halfPlane, halfPlaneDisplacement, halfPlaneGradient } from './surfaceEdgeImages.js';

/** The line, foil and Poisson ratio of the two half-space images it builds on. */
export type PlateEdgeOptions = Omit<EdgeImagesOptions, 'only'>;

/** The kink Delta omega = omega(+inf) - omega(-inf) of the far halves (rad) for b_x across the line at depth d. */
export function plateEdgeKink(bx: number, d: number, t: number): number {
  return (-6 * bx * d * (t - d)) / (t * t * t);
}

/** Numerical parameters (in units of the thickness t). */
export const PLATE_EDGE_GRID = {
  /** Half-width of the tabulated x range. */
  xRange: 6,
  /** Grid steps per thickness, in x and in y. */
  perThickness: 24,
  /** Upper end of the k integral (k t). */
  kMax: 36,
  /** Width of one Gauss-Legendre panel in k t, and its order. */
  panel: 1.5,
  order: 16,
} as const;


/**
 * Transform (k > 0) of the traction sigma_yy + i sigma_xy of a half-space image on the line
 * y = ys of its own frame, split into sigma^_yy and sigma^_xy (complex each): out[0..3] = (Re, Im) of each.
 * T = Phi + conj(Phi) + conj(z) Phi' + Psi with Phi = alpha/w - beta/w^2, Psi = delta/w - epsilon/w^2 - 2 zeta/w^3,
 * w = x + i q, q = ys + d; conj(z) = w - i Q, Q = 2 ys + d.
 */
function imageTractionTransform(h: HalfPlane, ys: number, k: number, out: Float64Array): void {
  const q = ys + h.d, Q = 2 * ys + h.d;
  const E = Math.exp(-k * q);
  // G1 = -2 pi i E, G2 = -2 pi k E, G3 = i pi k^2 E
  const g1I = -2 * Math.PI * E, g2R = -2 * Math.PI * k * E, g3I = Math.PI * k * k * E;
  // c1 = delta; c2 = beta + i Q alpha - epsilon; c3 = -2 i Q beta - 2 zeta
  const c1R = h.dR, c1I = h.dI;
  const c2R = h.bR - Q * h.aI - h.eR, c2I = h.bI + Q * h.aR - h.eI;
  const c3R = 2 * Q * h.bI - 2 * h.zR, c3I = -2 * Q * h.bR - 2 * h.zI;
  // FT(T) = c1 G1 + c2 G2 + c3 G3
  const tR = -c1I * g1I + c2R * g2R - c3I * g3I;
  const tI = c1R * g1I + c2I * g2R + c3R * g3I;
  // FT(conj T) = alpha G1 - beta G2
  const sR = -h.aI * g1I - h.bR * g2R;
  const sI = h.aR * g1I - h.bI * g2R;
  // sigma_yy = (T + conj T)/2, sigma_xy = (T - conj T)/(2i)
  out[0] = 0.5 * (tR + sR);
  out[1] = 0.5 * (tI + sI);
  out[2] = 0.5 * (tI - sI);
  out[3] = -0.5 * (tR - sR);
}

/** sinh(x) - x without cancellation. */
function sinhMinusX(x: number): number {
  if (Math.abs(x) > 0.5) return Math.sinh(x) - x;
  const x2 = x * x;
  let term = (x * x2) / 6, s = 0;
  for (let n = 3; Math.abs(term) > 1e-18 * Math.abs(s) || s === 0; n += 2) {
    s += term;
    term *= x2 / ((n + 1) * (n + 2));
    if (n > 40) break;
  }
  return s;
}

/** The plane problem of one line: frame data, the two images, the kink. */
export interface PlateEdgeProblem {
  readonly bx: number;
  readonly by: number;
  readonly d: number;
  readonly t: number;
  readonly nu: number;
  readonly top: HalfPlane;
  readonly bottom: HalfPlane;
  /** The infinite-medium line in the same coefficient form (gradient for the far field). */
  readonly line: HalfPlane;
  readonly kink: number;
}

export function plateEdgeProblem(bx: number, by: number, d: number, t: number, nu: number): PlateEdgeProblem {
  const top = halfPlane(bx, by, d, nu);
  const bottom = halfPlane(-bx, -by, t - d, nu);
  // the infinite line: Phi0 = gamma/(z - a), Psi0 = conj(gamma)/(z - a) + gamma conj(a)/(z - a)^2, a = i d:
  // the image form with w = x + i (y - d) (d -> -d), alpha = gamma, beta = 0, delta = conj(gamma), epsilon = -gamma conj(a) = i d gamma
  const kappa = 3 - 4 * nu;
  const s = 1 / (Math.PI * (kappa + 1));
  const gR = by * s, gI = -bx * s;
  const line: HalfPlane = { kappa, d: -d, aR: gR, aI: gI, bR: 0, bI: 0, dR: gR, dI: -gI, eR: -d * gI, eI: d * gR, zR: 0, zI: 0 };
  return { bx, by, d, t, nu, top, bottom, line, kink: plateEdgeKink(bx, d, t) };
}

/**
 * The residual's transforms at one k > 0 for the depths ys[j]: for each depth 8 complex numbers (Re, Im
 * interleaved, 16 reals): the 2 x 2 gradient (G00, G01, G10, G11) = (u_x,x, u_x,y, u_y,x, u_y,y), then their
 * y-derivatives; the rotation pole -i kink e^{-kt}/k taken off (added back in real space by the caller).
 */
export function residualSpectrum(p: PlateEdgeProblem, k: number, ys: ArrayLike<number>, out: Float64Array): void {
  const t = p.t, h = 0.5 * t, nu = p.nu;
  const L = new Float64Array(4);
  // required residual tractions: on y = t minus the top image's traction there; on y = 0 minus the bottom
  // image's, which in its own frame (x' = -x, y' = t - y) acts on y' = t: its transform at k is the conjugate
  imageTractionTransform(p.top, t, k, L);
  const PtR = -L[0], PtI = -L[1], StR = -L[2], StI = -L[3];
  imageTractionTransform(p.bottom, t, k, L);
  const P0R = -L[0], P0I = L[1], S0R = -L[2], S0I = L[3];
  // symmetric / antisymmetric loads
  const PsR = 0.5 * (PtR + P0R), PsI = 0.5 * (PtI + P0I);
  const PaR = 0.5 * (PtR - P0R), PaI = 0.5 * (PtI - P0I);
  const SsR = 0.5 * (StR - S0R), SsI = 0.5 * (StI - S0I);
  const SaR = 0.5 * (StR + S0R), SaI = 0.5 * (StI + S0I);
  const kh = k * h, ch = Math.cosh(kh), sh = Math.sinh(kh);
  const k2 = k * k;
  // boundary values phi(h) = -P/k^2, phi'(h) = i S / k
  const VsR = -PsR / k2, VsI = -PsI / k2, WsR = -SsI / k, WsI = SsR / k;
  const VaR = -PaR / k2, VaI = -PaI / k2, WaR = -SaI / k, WaI = SaR / k;
  // symmetric: f1 = cosh, f2 = eta sinh; det = (sinh kt + kt)/2
  const detS = 0.5 * (Math.sinh(2 * kh) + 2 * kh);
  const f2s = h * sh, f2sp = sh + kh * ch, f1s = ch, f1sp = k * sh;
  const AR = (VsR * f2sp - WsR * f2s) / detS, AI = (VsI * f2sp - WsI * f2s) / detS;
  const BR = (WsR * f1s - VsR * f1sp) / detS, BI = (WsI * f1s - VsI * f1sp) / detS;
  // antisymmetric: f1 = sinh, f2 = eta cosh; det = (sinh kt - kt)/2
  const detA = 0.5 * sinhMinusX(2 * kh);
  const f1a = sh, f1ap = k * ch, f2a = h * ch, f2ap = ch + kh * sh;
  const CR = (VaR * f2ap - WaR * f2a) / detA, CI = (VaI * f2ap - WaI * f2a) / detA;
  const DR = (WaR * f1a - VaR * f1ap) / detA, DI = (WaI * f1a - VaI * f1ap) / detA;
  const c1 = 0.5 * (1 - nu), c2 = 0.5 * nu;
  const E = Math.exp(-k * t);
  const poleI = (-p.kink * E) / k; // S = -i kink e^{-kt}/k = i poleI
  for (let j = 0; j < ys.length; j++) {
    const eta = ys[j] - h;
    const C = Math.cosh(k * eta), Sn = Math.sinh(k * eta);
    const ke = k * eta;
    // derivatives of the four basis functions (order 0..3)
    const a0 = C, a1 = k * Sn, a2 = k2 * C, a3 = k2 * k * Sn; // cosh
    const b0 = eta * Sn, b1 = Sn + ke * C, b2 = 2 * k * C + k * ke * Sn, b3 = 3 * k2 * Sn + k2 * ke * C; // eta sinh
    const e0 = Sn, e1 = k * C, e2 = k2 * Sn, e3 = k2 * k * C; // sinh
    const d0 = eta * C, d1 = C + ke * Sn, d2 = 2 * k * Sn + k * ke * C, d3 = 3 * k2 * C + k2 * ke * Sn; // eta cosh
    const p0R = AR * a0 + BR * b0 + CR * e0 + DR * d0, p0I = AI * a0 + BI * b0 + CI * e0 + DI * d0;
    const p1R = AR * a1 + BR * b1 + CR * e1 + DR * d1, p1I = AI * a1 + BI * b1 + CI * e1 + DI * d1;
    const p2R = AR * a2 + BR * b2 + CR * e2 + DR * d2, p2I = AI * a2 + BI * b2 + CI * e2 + DI * d2;
    const p3R = AR * a3 + BR * b3 + CR * e3 + DR * d3, p3I = AI * a3 + BI * b3 + CI * e3 + DI * d3;
    const p4R = 2 * k2 * p2R - k2 * k2 * p0R, p4I = 2 * k2 * p2I - k2 * k2 * p0I;
    // eps_xx, eps_yy, d eps_xx/dy, d^2 eps_xx/dy^2
    const exR = c1 * p2R + c2 * k2 * p0R, exI = c1 * p2I + c2 * k2 * p0I;
    const eyR = -c1 * k2 * p0R - c2 * p2R, eyI = -c1 * k2 * p0I - c2 * p2I;
    const ex1R = c1 * p3R + c2 * k2 * p1R, ex1I = c1 * p3I + c2 * k2 * p1I;
    const ey1R = -c1 * k2 * p1R - c2 * p3R, ey1I = -c1 * k2 * p1I - c2 * p3I;
    const ex2R = c1 * p4R + c2 * k2 * p2R, ex2I = c1 * p4I + c2 * k2 * p2I;
    // G01 = -i eps_xx'/k (+ S), G10 = -i k phi' + i eps_xx'/k (- S); S = i poleI
    const o = 16 * j;
    out[o] = exR; out[o + 1] = exI;
    out[o + 2] = ex1I / k; out[o + 3] = -ex1R / k + poleI;
    out[o + 4] = k * p1I - ex1I / k; out[o + 5] = -k * p1R + ex1R / k - poleI;
    out[o + 6] = eyR; out[o + 7] = eyI;
    // y-derivatives
    out[o + 8] = ex1R; out[o + 9] = ex1I;
    out[o + 10] = ex2I / k; out[o + 11] = -ex2R / k;
    out[o + 12] = k * p2I - ex2I / k; out[o + 13] = -k * p2R + ex2R / k;
    out[o + 14] = ey1R; out[o + 15] = ey1I;
  }
}

/** k nodes and weights (weights include the 1/pi of the one-sided inverse transform). */
function kNodes(t: number): { k: Float64Array; w: Float64Array } {
  const G = PLATE_EDGE_GRID;
  const gl = gaussLegendre(G.order);
  const panels = Math.ceil(G.kMax / G.panel);
  const k = new Float64Array(panels * G.order), w = new Float64Array(panels * G.order);
  const dk = G.panel / t;
  for (let p = 0; p < panels; p++)
    for (let i = 0; i < G.order; i++) {
      k[p * G.order + i] = dk * (p + 0.5 * (gl.x[i] + 1));
      w[p * G.order + i] = (0.5 * dk * gl.w[i]) / Math.PI;
    }
  return { k, w };
}

/**
 * The residual's 2 x 2 gradient at (x, y) by the direct k integral (no table; tests and the table's own check):
 * out[0..3] = (u_x,x, u_x,y, u_y,x, u_y,y).
 */
export function plateEdgeResidualDirect(p: PlateEdgeProblem, x: number, y: number, out: Float64Array): void {
  const { k, w } = kNodes(p.t);
  const spec = new Float64Array(16);
  const ys = [y];
  for (let c = 0; c < 4; c++) out[c] = 0;
  for (let m = 0; m < k.length; m++) {
    residualSpectrum(p, k[m], ys, spec);
    const cr = Math.cos(k[m] * x), ci = Math.sin(k[m] * x);
    for (let c = 0; c < 4; c++) out[c] += w[m] * (spec[2 * c] * cr - spec[2 * c + 1] * ci);
  }
  const om = (p.kink / Math.PI) * Math.atan(x / p.t);
  out[1] -= om;
  out[2] += om;
}

/** The tabulated residual: 4 components x (f, f_x, f_y, f_xy) per node. */
export interface PlateEdgeTable extends HermiteGrid {
  /** node (i, j) at 16 (j nx + i): component c at 4 c + (0 f, 1 f_x, 2 f_y, 3 f_xy). */
  readonly data: Float64Array;
}

export function plateEdgeTable(p: PlateEdgeProblem): PlateEdgeTable {
  const G = PLATE_EDGE_GRID;
  const t = p.t;
  const X = G.xRange * t;
  const nx = 2 * G.xRange * G.perThickness + 1;
  const ny = G.perThickness + 1;
  const hx = (2 * X) / (nx - 1), hy = t / (ny - 1);
  const ys = new Float64Array(ny);
  for (let j = 0; j < ny; j++) ys[j] = j * hy;
  const { k, w } = kNodes(t);
  const data = new Float64Array(16 * nx * ny);
  const spec = new Float64Array(16 * ny);
  for (let m = 0; m < k.length; m++) {
    const km = k[m], wm = w[m];
    residualSpectrum(p, km, ys, spec);
    const sR = Math.cos(km * hx), sI = Math.sin(km * hx);
    for (let j = 0; j < ny; j++) {
      const o = 16 * j;
      // weighted values F (4) and y-derivatives Fy (4); d/dx multiplies by i k
      const F = spec.subarray(o, o + 16);
      let eR = Math.cos(-km * X), eI = Math.sin(-km * X);
      let base = 16 * j * nx;
      for (let i = 0; i < nx; i++) {
        for (let c = 0; c < 4; c++) {
          const fR = F[2 * c], fI = F[2 * c + 1], gR = F[8 + 2 * c], gI = F[8 + 2 * c + 1];
          const re = fR * eR - fI * eI, im = fR * eI + fI * eR;
          const reY = gR * eR - gI * eI, imY = gR * eI + gI * eR;
          const q = base + 4 * c;
          data[q] += wm * re;
          data[q + 1] -= wm * km * im; // Re(i k F e) = -k Im(F e)
          data[q + 2] += wm * reY;
          data[q + 3] -= wm * km * imY;
        }
        const nR = eR * sR - eI * sI;
        eI = eR * sI + eI * sR;
        eR = nR;
        base += 16;
      }
    }
  }
  // the rotation pole's closed form: omega_S = (kink/pi) atan(x/t) into G01 (minus) and G10 (plus)
  for (let i = 0; i < nx; i++) {
    const x = -X + i * hx;
    const om = (p.kink / Math.PI) * Math.atan(x / t);
    const omx = (p.kink / Math.PI) * (t / (t * t + x * x));
    for (let j = 0; j < ny; j++) {
      const q = 16 * (j * nx + i);
      data[q + 4] -= om;
      data[q + 5] -= omx;
      data[q + 8] += om;
      data[q + 9] += omx;
    }
  }
  return { nx, ny, x0: -X, hx, hy, data };
}

/** Bicubic Hermite interpolation of the table at (x, y) (|x| <= 6 t, 0 <= y <= t) into out[0..3]. */
export function plateEdgeInterpolate(tb: PlateEdgeTable, x: number, y: number, out: Float64Array): void {
  hermiteGrid(tb, tb.data, 4, x, y, out);
}


/**
 * The residual's displacement (u_x, u_y) on the table's grid, as (f, f_x, f_y, f_xy) per component (8 per node):
 * the derivatives are the gradient table's values (u_a,x = G_a0, u_a,y = G_a1, u_a,xy = d G_a0 / dy), the values
 * its integral, exact for the cubic Hermite interpolant (h (f0 + f1)/2 + h^2 (f0' - f1')/12 per step), along the
 * entrance-surface row from the middle column and from there along every column (up to a constant).
 */
function displacementTable(tb: PlateEdgeTable): Float64Array {
  const { nx, ny, hx, hy, data } = tb;
  const u = new Float64Array(8 * nx * ny);
  const i0 = (nx - 1) >> 1;
  for (let n = 0; n < nx * ny; n++)
    for (let a = 0; a < 2; a++) {
      const gx = 16 * n + 4 * (2 * a), gy = 16 * n + 4 * (2 * a + 1);
      const o = 8 * n + 4 * a;
      u[o + 1] = data[gx];
      u[o + 2] = data[gy];
      u[o + 3] = data[gx + 2];
    }
  const step = (f0: number, d0: number, f1: number, d1: number, h: number) => 0.5 * h * (f0 + f1) + (h * h * (d0 - d1)) / 12;
  for (let a = 0; a < 2; a++) {
    const cx = 4 * (2 * a), cy = 4 * (2 * a + 1), o = 4 * a;
    for (let i = i0; i + 1 < nx; i++) u[8 * (i + 1) + o] = u[8 * i + o] + step(data[16 * i + cx], data[16 * i + cx + 1], data[16 * (i + 1) + cx], data[16 * (i + 1) + cx + 1], hx);
    for (let i = i0; i > 0; i--) u[8 * (i - 1) + o] = u[8 * i + o] - step(data[16 * (i - 1) + cx], data[16 * (i - 1) + cx + 1], data[16 * i + cx], data[16 * i + cx + 1], hx);
    for (let i = 0; i < nx; i++)
      for (let j = 0; j + 1 < ny; j++) {
        const q0 = 16 * (j * nx + i), q1 = 16 * ((j + 1) * nx + i);
        u[8 * ((j + 1) * nx + i) + o] = u[8 * (j * nx + i) + o] + step(data[q0 + cy], data[q0 + cy + 2], data[q1 + cy], data[q1 + cy + 2], hy);
      }
  }
  return u;
}

/**
 * The whole correction's 2 x 2 gradient at (x, y): the two images plus the tabulated residual (|x| <= 6 t),
 * beyond that minus the infinite line's gradient plus the far rotation +-kink/2.
 */
export function plateEdgeLocal(p: PlateEdgeProblem, tb: PlateEdgeTable, x: number, y: number, out: Float64Array, G: Float64Array): void {
  if (Math.abs(x) <= -tb.x0) {
    plateEdgeInterpolate(tb, x, y, out);
    halfPlaneGradient(p.top, x, y, G);
    out[0] += G[0]; out[1] += G[1]; out[2] += G[2]; out[3] += G[3];
    halfPlaneGradient(p.bottom, -x, p.t - y, G);
    out[0] += G[0]; out[1] += G[1]; out[2] += G[2]; out[3] += G[3];
    return;
  }
  halfPlaneGradient(p.line, x, y, G);
  const om = x > 0 ? 0.5 * p.kink : -0.5 * p.kink;
  out[0] = -G[0];
  out[1] = -G[1] - om;
  out[2] = -G[2] + om;
  out[3] = -G[3];
}

/**
 * Tables already built in this thread, by line (b_x, b_y, depth, thickness, nu): a render cut into parts or bands
 * rebuilds its fields for each, and a worker keeps its tables from one part to the next (about 0.9 MB each).
 */
const TABLES = new Map<string, PlateEdgeTable>();
const DISPLACEMENT_TABLES = new WeakMap<PlateEdgeTable, Float64Array>();

function cachedDisplacementTable(tb: PlateEdgeTable): Float64Array {
  let u = DISPLACEMENT_TABLES.get(tb);
  if (u === undefined) {
    u = displacementTable(tb);
    DISPLACEMENT_TABLES.set(tb, u);
  }
  return u;
}
const TABLES_KEPT = 16;

function cachedTable(p: PlateEdgeProblem): PlateEdgeTable {
  const key = `${p.bx},${p.by},${p.d},${p.t},${p.nu}`;
  let tb = TABLES.get(key);
  if (tb === undefined) {
    tb = plateEdgeTable(p);
    if (TABLES.size >= TABLES_KEPT) TABLES.delete(TABLES.keys().next().value as string);
  } else TABLES.delete(key); // re-inserted below: most recently used last
  TABLES.set(key, tb);
  return tb;
}

/** The correction field of the edge component (b - (b.u) u) of a line parallel to the surfaces. */
export function plateEdgeCorrection(o: PlateEdgeOptions): DisplacementField {
  const u = unit(o.line);
  const n = unit(o.normal);
  const m = cross(n, u);
  const t = o.thickness_nm;
  const p = plateEdgeProblem(dot(o.b_nm, m), dot(o.b_nm, n), dot(o.point_nm, n), t, o.poissonRatio);
  const tb = cachedTable(p);
  const xi0 = dot(o.point_nm, m);
  const [m0, m1, m2] = m;
  const [n0, n1, n2] = n;
  const H = new Float64Array(4), G = new Float64Array(4);
  const local = (px: number, py: number, pz: number): void => {
    plateEdgeLocal(p, tb, px * m0 + py * m1 + pz * m2 - xi0, px * n0 + py * n1 + pz * n2, H, G);
  };
  /** images' displacement (local x, y components) into U */
  const U = new Float64Array(2), V = new Float64Array(2);
  const images = (x: number, y: number): void => {
    halfPlaneDisplacement(p.top, x, y, U);
    const ux = U[0], uy = U[1];
    halfPlaneDisplacement(p.bottom, -x, t - y, U);
    U[0] = ux - U[0];
    U[1] = uy - U[1];
  };
  const X = -tb.x0;
  /** the infinite line's displacement into V, its cut moved off the far field (to x = 0, y < d) */
  const lineDisp = (x: number, y: number, J: readonly [number, number]): void => {
    halfPlaneDisplacement(p.line, x, y, V);
    if (x < 0 && y < p.d) {
      V[0] += J[0];
      V[1] += J[1];
    }
  };
  /** images plus the residual's displacement table at (x, y) (|x| <= X) into U */
  const inside = (u: Float64Array, x: number, y: number): void => {
    hermiteGrid(tb, u, 2, x, y, V);
    const vx = V[0], vy = V[1];
    images(x, y);
    U[0] += vx;
    U[1] += vy;
  };
  // built on first use (tests and tools; the renderer needs only the gradient)
  interface Disp { u: Float64Array; c0x: number; c0y: number; J: [number, number]; far: [number, number, number, number] }
  let disp: Disp | null = null;
  const setup = (): Disp => {
    const u = cachedDisplacementTable(tb);
    inside(u, 0, p.d);
    const c0x = U[0], c0y = U[1];
    // the jump of the line's displacement across its cut (y = d, x < 0)
    halfPlaneDisplacement(p.line, -1, p.d + 1e-12, V);
    const ax = V[0], ay = V[1];
    halfPlaneDisplacement(p.line, -1, p.d - 1e-12, V);
    const J: [number, number] = [ax - V[0], ay - V[1]];
    // far field: minus the line, the rotation -+kink/2, a translation that meets the table at (-+X, d)
    const far: [number, number, number, number] = [0, 0, 0, 0];
    for (const side of [0, 1]) {
      const x = side === 0 ? -X : X;
      const om = side === 0 ? -0.5 * p.kink : 0.5 * p.kink;
      inside(u, x, p.d);
      const wx = U[0], wy = U[1];
      lineDisp(x, p.d, J);
      far[2 * side] = wx + V[0] + om * p.d;
      far[2 * side + 1] = wy + V[1] - om * x;
    }
    disp = { u, c0x, c0y, J, far };
    return disp;
  };
  const gradient = (out: Float64Array, px: number, py: number, pz: number): void => {
    local(px, py, pz);
    for (let i = 0; i < 3; i++) {
      const a = m[i] * H[0] + n[i] * H[2];
      const b = m[i] * H[1] + n[i] * H[3];
      out[3 * i] = a * m0 + b * n0;
      out[3 * i + 1] = a * m1 + b * n1;
      out[3 * i + 2] = a * m2 + b * n2;
    }
  };
  return withDirectional({
    displacement(out, px, py, pz) {
      const D = disp ?? setup();
      const x = px * m0 + py * m1 + pz * m2 - xi0;
      const y = px * n0 + py * n1 + pz * n2;
      let ux: number, uy: number;
      if (Math.abs(x) <= X) {
        inside(D.u, x, y);
        ux = U[0] - D.c0x;
        uy = U[1] - D.c0y;
      } else {
        const side = x < 0 ? 0 : 1;
        const om = side === 0 ? -0.5 * p.kink : 0.5 * p.kink;
        lineDisp(x, y, D.J);
        ux = -V[0] - om * y + D.far[2 * side] - D.c0x;
        uy = -V[1] + om * x + D.far[2 * side + 1] - D.c0y;
      }
      out[0] = ux * m0 + uy * n0;
      out[1] = ux * m1 + uy * n1;
      out[2] = ux * m2 + uy * n2;
    },
    gradient,
    directionalAt(g, k): DirectionalProbe {
      const gm = g[0] * m0 + g[1] * m1 + g[2] * m2;
      const gn = g[0] * n0 + g[1] * n1 + g[2] * n2;
      const km = k[0] * m0 + k[1] * m1 + k[2] * m2;
      const kn = k[0] * n0 + k[1] * n1 + k[2] * n2;
      if ((gm === 0 && gn === 0) || (km === 0 && kn === 0)) return (q) => { q[3] = 0; };
      const w0 = gm * km, w1 = gm * kn, w2 = gn * km, w3 = gn * kn;
      // the table contracted to the one scalar g.(grad R).k (linear in the four components): one interpolation per point
      const nn = tb.nx * tb.ny;
      const scalar = new Float64Array(4 * nn);
      const dt = tb.data;
      for (let q = 0; q < nn; q++)
        for (let e = 0; e < 4; e++) scalar[4 * q + e] = w0 * dt[16 * q + e] + w1 * dt[16 * q + 4 + e] + w2 * dt[16 * q + 8 + e] + w3 * dt[16 * q + 12 + e];
      const S = new Float64Array(1), Gi = new Float64Array(4);
      const X = -tb.x0, t = p.t;
      return (q) => {
        const x = q[0] * m0 + q[1] * m1 + q[2] * m2 - xi0;
        const y = q[0] * n0 + q[1] * n1 + q[2] * n2;
        if (Math.abs(x) <= X) {
          hermiteGrid(tb, scalar, 1, x, y, S);
          halfPlaneGradient(p.top, x, y, Gi);
          let v = S[0] + w0 * Gi[0] + w1 * Gi[1] + w2 * Gi[2] + w3 * Gi[3];
          halfPlaneGradient(p.bottom, -x, t - y, Gi);
          v += w0 * Gi[0] + w1 * Gi[1] + w2 * Gi[2] + w3 * Gi[3];
          q[3] = v;
          return;
        }
        local(q[0], q[1], q[2]);
        q[3] = w0 * H[0] + w1 * H[1] + w2 * H[2] + w3 * H[3];
      };
    },
    gradientAt(out, q) {
      gradient(out, q[0], q[1], q[2]);
    },
  });
}
