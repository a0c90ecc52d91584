/**
 * The propagator of one slice of a column for the two-beam Howie-Whelan
 * equations (physics.md section 3), written out on real scalars.
 *
 * The equations are d(phi)/dz = A(z) phi with
 *   A(z) = pi i M(z) - (pi/xi'0) I,   M(z) = [[0, q], [q, 2 (s + beta'(z))]],
 *   q = 1/xi_g + i/xi'_g.
 *
 * For a constant s_e = s + beta' the exact slice matrix is
 *   exp(A D) = e^{-pi D/xi'0} e^{pi i s_e D} [cos(pi sigma D) I
 *              + i sin(pi sigma D)/sigma (M - s_e I)],  sigma^2 = s_e^2 + q^2
 * (physics.md section 3; (M - s_e I)^2 = sigma^2 I).
 *
 * For a varying beta' the slice uses the fourth-order Magnus step with the
 * two Gauss-Legendre nodes z_{1,2} = z + D (1/2 -+ sqrt(3)/6)
 * (Iserles & Norsett 1999, Phil. Trans. R. Soc. A 357, 983; Blanes, Casas,
 * Oteo & Ros 2009, Phys. Rep. 470, 151):
 *   Omega = D/2 (A1 + A2) + sqrt(3) D^2 / 12 [A2, A1].
 * The first term is the slab with s_e = s + (b1 + b2)/2, the Gauss-Legendre
 * mean of beta' over the slice. With b_k = beta'(z_k) and P = diag(0, 1),
 *   [M2, M1] = 2 (b2 - b1) [P, M] = 2 (b2 - b1) q J,  J = [[0, -1], [1, 0]],
 * so [A2, A1] = -2 pi^2 (b2 - b1) q J and
 *   Omega = pi i D ( M_e - i eps q J ) - (pi D/xi'0) I,
 *   eps = -(sqrt(3)/6) pi D (b2 - b1),   M_e = [[0, q], [q, 2 s_e]].
 * M_e - i eps q J = [[0, q (1 + i eps)], [q (1 - i eps), 2 s_e]] has the same
 * structure as M, so the exact exponential above applies with the two
 * off-diagonal elements q(1 + i eps), q(1 - i eps) and
 *   sigma^2 = s_e^2 + q^2 (1 + eps^2).
 * eps = 0 (constant beta') gives the exact slab matrix.
 *
 * Only the mean of beta' over the slice and its first moment
 *   I = int_0^D beta'(z) (D - 2 z) dz
 * enter: eps = pi I / D. The Gauss-Legendre nodes give I = (sqrt(3)/6) D^2
 * (b1 - b2); Simpson's rule on the slice's ends and middle gives the mean
 * (b_0 + 4 b_mid + b_D)/6 and I = D^2 (b_0 - b_D)/6, eps = -(pi/6) D (b_D -
 * b_0) (exact for beta' of degree 3 and 2, so the step keeps order 4;
 * twoBeamColumn.ts uses these).
 */

const PI = Math.PI;

/**
 * Writes exp(Omega) of one slice of length h (nm) into m[o..o+7] as
 * (re t00, im t00, re t01, im t01, re t10, im t10, re t11, im t11), acting on
 * (phi0, phig). qr, qi: real and imaginary parts of q (nm^-1); se: s + mean
 * beta' (nm^-1); eps: the Magnus correction (0 for a constant s_e); invXi0:
 * 1/xi'_0 (nm^-1).
 */
export function slabMatrix(
  m: Float64Array,
  o: number,
  qr: number,
  qi: number,
  se: number,
  eps: number,
  h: number,
  invXi0: number,
): void {
  const e2 = 1 + eps * eps;
  // sigma^2 = se^2 + q^2 (1 + eps^2) = X + iY
  const X = se * se + (qr * qr - qi * qi) * e2;
  const Y = 2 * qr * qi * e2;
  // complex square root (either branch: the matrix is even in sigma)
  const r = Math.sqrt(X * X + Y * Y);
  let sr: number;
  let si: number;
  if (X >= 0) {
    sr = Math.sqrt(0.5 * (r + X));
    si = sr > 0 ? Y / (2 * sr) : 0;
  } else {
    si = Math.sqrt(0.5 * (r - X));
    sr = Y / (2 * si);
  }
  // z = pi h sigma = a + i b; damping d = pi h / xi'0 folded into cosh/sinh
  const ph = PI * h;
  const a = ph * sr;
  const b = ph * si;
  const d = ph * invXi0;
  const ep = Math.exp(b - d);
  const em = Math.exp(-b - d);
  const ch = 0.5 * (ep + em);
  const sh = 0.5 * (ep - em);
  const ca = Math.cos(a);
  const sa = Math.sin(a);
  // C = cos(z) e^{-d}, S = sin(z) e^{-d}
  const Cr = ca * ch;
  const Ci = -sa * sh;
  const Sr = sa * ch;
  const Si = ca * sh;
  // iK = i sin(z) e^{-d} / sigma
  const den = sr * sr + si * si;
  const Kr = (Sr * sr + Si * si) / den;
  const Ki = (Si * sr - Sr * si) / den;
  const iKr = -Ki;
  const iKi = Kr;
  // diagonal: C -+ iK se
  const t00r = Cr - iKr * se;
  const t00i = Ci - iKi * se;
  const t11r = Cr + iKr * se;
  const t11i = Ci + iKi * se;
  // off-diagonal: iK q (1 + i eps) and iK q (1 - i eps)
  const upr = qr - qi * eps;
  const upi = qi + qr * eps;
  const lor = qr + qi * eps;
  const loi = qi - qr * eps;
  const t01r = iKr * upr - iKi * upi;
  const t01i = iKr * upi + iKi * upr;
  const t10r = iKr * lor - iKi * loi;
  const t10i = iKr * loi + iKi * lor;
  // common phase e^{i pi h se}
  const th = ph * se;
  const cp = Math.cos(th);
  const sp = Math.sin(th);
  m[o] = cp * t00r - sp * t00i;
  m[o + 1] = cp * t00i + sp * t00r;
  m[o + 2] = cp * t01r - sp * t01i;
  m[o + 3] = cp * t01i + sp * t01r;
  m[o + 4] = cp * t10r - sp * t10i;
  m[o + 5] = cp * t10i + sp * t10r;
  m[o + 6] = cp * t11r - sp * t11i;
  m[o + 7] = cp * t11i + sp * t11r;
}

// scratch of stepSlice (not re-entrant; no allocation per call)
const T = new Float64Array(8);

/**
 * Multiplies the amplitudes st[o..o+3] = (re phi0, im phi0, re phig, im phig)
 * in place by exp(Omega) of one slice of length h (nm) (the matrix of
 * slabMatrix, same arguments).
 */
export function stepSlice(
  st: Float64Array,
  o: number,
  qr: number,
  qi: number,
  se: number,
  eps: number,
  h: number,
  invXi0: number,
): void {
  slabMatrix(T, 0, qr, qi, se, eps, h, invXi0);
  const x0r = st[o];
  const x0i = st[o + 1];
  const xgr = st[o + 2];
  const xgi = st[o + 3];
  st[o] = T[0] * x0r - T[1] * x0i + T[2] * xgr - T[3] * xgi;
  st[o + 1] = T[0] * x0i + T[1] * x0r + T[2] * xgi + T[3] * xgr;
  st[o + 2] = T[4] * x0r - T[5] * x0i + T[6] * xgr - T[7] * xgi;
  st[o + 3] = T[4] * x0i + T[5] * x0r + T[6] * xgi + T[7] * xgr;
}

/**
 * Multiplies st[o..o+3] in place by exp(Omega) of one slice without its scalar
 * factor e^{-pi h/xi'0} e^{i pi h se} (the trace part of Omega, the same for
 * both amplitudes), i.e. by cos(pi sigma h) I + i sin(pi sigma h)/sigma
 * (M_e - i eps q J - se I) with sigma^2 = se^2 + q^2 (1 + eps^2). The
 * arguments come in the block P = [qr, qi, se, eps, h] (same meaning as for
 * slabMatrix). A caller that applies the scalar factor itself
 * (twoBeamColumn.ts: the damping once per accepted slice, the phase once per
 * column) saves an exponential, a cosine and a sine per slice; the block
 * saves boxing the doubles of a call that is not inlined. Same formula as
 * slabMatrix (kept apart for those two reasons: about 40 % less CPU per slice).
 */
export function stepSliceNoScalar(st: Float64Array, o: number, P: Float64Array): void {
  const qr = P[0];
  const qi = P[1];
  const se = P[2];
  const eps = P[3];
  const e2 = 1 + eps * eps;
  const X = se * se + (qr * qr - qi * qi) * e2;
  const Y = 2 * qr * qi * e2;
  const r = Math.sqrt(X * X + Y * Y);
  let sr: number;
  let si: number;
  if (X >= 0) {
    sr = Math.sqrt(0.5 * (r + X));
    si = sr > 0 ? Y / (2 * sr) : 0;
  } else {
    si = Math.sqrt(0.5 * (r - X));
    sr = Y / (2 * si);
  }
  const ph = PI * P[4];
  const ep = Math.exp(ph * si);
  const em = 1 / ep;
  const ch = 0.5 * (ep + em);
  const sh = 0.5 * (ep - em);
  const ca = Math.cos(ph * sr);
  const sa = Math.sin(ph * sr);
  // C = cos(pi sigma h), iK = i sin(pi sigma h) / sigma (|sigma|^2 = r)
  const Cr = ca * ch;
  const Ci = -sa * sh;
  const Sr = sa * ch;
  const Si = ca * sh;
  const iKr = -(Si * sr - Sr * si) / r;
  const iKi = (Sr * sr + Si * si) / r;
  const t00r = Cr - iKr * se;
  const t00i = Ci - iKi * se;
  const t11r = Cr + iKr * se;
  const t11i = Ci + iKi * se;
  const upr = qr - qi * eps;
  const upi = qi + qr * eps;
  const lor = qr + qi * eps;
  const loi = qi - qr * eps;
  const t01r = iKr * upr - iKi * upi;
  const t01i = iKr * upi + iKi * upr;
  const t10r = iKr * lor - iKi * loi;
  const t10i = iKr * loi + iKi * lor;
  const x0r = st[o];
  const x0i = st[o + 1];
  const xgr = st[o + 2];
  const xgi = st[o + 3];
  st[o] = t00r * x0r - t00i * x0i + t01r * xgr - t01i * xgi;
  st[o + 1] = t00r * x0i + t00i * x0r + t01r * xgi + t01i * xgr;
  st[o + 2] = t10r * x0r - t10i * x0i + t11r * xgr - t11i * xgi;
  st[o + 3] = t10r * x0i + t10i * x0r + t11r * xgi + t11i * xgr;
}

/**
 * Multiplies state[0..3] in place by the fault matrix diag(1, e^{+i alpha}),
 * alpha = 2 pi g.(R_below - R_above) in radians.
 */
export function applyFaultPhase(state: Float64Array, alpha_rad: number): void {
  const c = Math.cos(alpha_rad);
  const sn = Math.sin(alpha_rad);
  const gr = state[2];
  const gi = state[3];
  state[2] = c * gr - sn * gi;
  state[3] = c * gi + sn * gr;
}
