#!/usr/bin/env python3
"""Independent reference for the exact anisotropic plate correction of a straight dislocation
parallel to the foil surfaces (src/elasticity/surfacePlateStroh.ts).

A different route from the TypeScript code at every step:
- the Stroh eigenproblem from numpy.linalg.eig of Ting's 6 x 6 fundamental matrix
  N = [[-T^-1 R^T, T^-1], [R T^-1 R^T - Q, -R T^-1]] (Ting 1996, Anisotropic Elasticity, ch. 5;
  Q_ik = C_i1k1, R_ik = C_i1k2, T_ik = C_i2k2 in the frame x1 = m, x2 = n, x3 = u), eigenvectors
  (a, b) normalised by 2 a.b = 1; the dislocation u = (1/pi) Im sum a_a ln(z_a) q_a, q = B^T b
  (checked here: 2 Re A B^T = I, 2 Re B B^T = 0). The TypeScript code takes its modes from
  anisotropicDislocation.ts (triangular Schur form, its own normalisation).
- no images: the strip 0 < y < t is loaded with minus the infinite line's own tractions on both
  surfaces, (1/pi) Im sum b_a q_a / (x + p_a (y_s - d)), transformed by residues; the six modes
  with Ting's b vectors as tractions, solved per k by numpy.linalg.solve (the whole correction,
  near-surface part included, from one Fourier integral).
- the rotation pole: its strength W taken from the spectrum itself (Richardson from k t = 1e-3 and
  2e-3), not from beam theory; -i W e^{-kt}/k is taken off and (W/pi) atan(x/t) added back.
- the k integral: scipy.integrate.quad_vec (adaptive Gauss-Kronrod) from k t = 1e-3 up to k = 40/(min(d, t - d) min Im p),
  the first sliver [0, 1e-3/t] by the trapezoid rule.

Input (stdin JSON): {"voigt": 36 numbers (crystal frame), "m", "n", "u": unit vectors (crystal frame),
"b": Burgers vector (crystal frame), "d", "t", "points": [[x, y], ...]}.
Output: {"grad": [[9 numbers]] the correction's Cartesian (crystal frame) gradient dR_i/dx_j at each
point, "W": the kink}.
"""
import json
import sys

import numpy as np
from scipy.integrate import quad_vec

VOIGT = [[0, 5, 4], [5, 1, 3], [4, 3, 2]]


def main():
    inp = json.load(sys.stdin)
    V = np.array(inp["voigt"], dtype=float).reshape(6, 6)
    C = np.zeros((3, 3, 3, 3))
    for i in range(3):
        for j in range(3):
            for k in range(3):
                for l in range(3):
                    C[i, j, k, l] = V[VOIGT[i][j], VOIGT[k][l]]
    m, n, u = (np.array(inp[key], dtype=float) for key in ("m", "n", "u"))
    Rot = np.array([m, n, u])  # rows: local axes in crystal components
    Cl = np.einsum("ai,bj,ck,dl,ijkl->abcd", Rot, Rot, Rot, Rot, C)
    Q = Cl[:, 0, :, 0]
    R = Cl[:, 0, :, 1]
    T = Cl[:, 1, :, 1]
    Ti = np.linalg.inv(T)
    N = np.block([[-Ti @ R.T, Ti], [R @ Ti @ R.T - Q, -R @ Ti]])
    w, X = np.linalg.eig(N)
    idx = [i for i in range(6) if w[i].imag > 0]
    assert len(idx) == 3
    p = w[idx]
    A = X[:3, idx].astype(complex)
    B = X[3:, idx].astype(complex)
    for a in range(3):
        s = np.sqrt(2 * A[:, a] @ B[:, a])
        A[:, a] /= s
        B[:, a] /= s
    assert np.allclose(2 * (A @ B.T).real, np.eye(3), atol=1e-10)
    assert np.allclose(2 * (B @ B.T).real, 0, atol=1e-8 * np.abs(T).max())
    bl = Rot @ np.array(inp["b"], dtype=float)
    q = B.T @ bl
    d = float(inp["d"])
    t = float(inp["t"])
    pts = inp["points"]

    def spectrum(k, ys):
        """Gradient spectrum (u_i,x^ and u_i,y^, local i) at depths ys for one k > 0 (numpy, complex128)."""
        # loads: minus the line's traction transform on y = 0 and y = t
        L = np.zeros((2, 3), dtype=complex)
        for qs, ysurf in enumerate((0.0, t)):
            for a in range(3):
                s = -p[a] * (ysurf - d)
                c = B[:, a] * q[a]
                if s.imag < 0:
                    L[qs] -= -c * np.exp(-1j * k * s)
                else:
                    L[qs] -= np.conj(c) * np.exp(-1j * k * np.conj(s))
        # modes e^{ik p y} and e^{ik conj(p) (y - t)} (the second referred to the exit surface, so nothing overflows)
        M = np.zeros((6, 6), dtype=complex)
        for qs, ysurf in enumerate((0.0, t)):
            e = np.exp(1j * k * p * ysurf)
            ec = np.exp(1j * k * np.conj(p) * (ysurf - t))
            M[3 * qs: 3 * qs + 3, :3] = 1j * k * B * e
            M[3 * qs: 3 * qs + 3, 3:] = 1j * k * np.conj(B) * ec
        c = np.linalg.solve(M, L.ravel())
        out = []
        for y in ys:
            e = np.exp(1j * k * p * y) * c[:3]
            ec = np.exp(1j * k * np.conj(p) * (y - t)) * c[3:]
            gx = 1j * k * (A @ e + np.conj(A) @ ec)
            gy = 1j * k * (A @ (p * e) + np.conj(A) @ (np.conj(p) * ec))
            out.append(np.concatenate([gx, gy]))
        return out

    # the rotation pole's strength from the spectrum itself: omega^ ~ -i W / k, omega = (u_2,1 - u_1,2)/2,
    # W(k) = Re(i k omega^) = W + O(k): Richardson from k t = 1e-3 and 2e-3
    def Wat(k):
        s0 = spectrum(k, [d])[0]
        return float((1j * k * 0.5 * (s0[1] - s0[3])).real)

    W = 2 * Wat(1e-3 / t) - Wat(2e-3 / t)

    ys = sorted(set(float(y) for _, y in pts))

    def integrand(k):
        spec = spectrum(k, ys)
        pole = -1j * W * np.exp(-k * t) / k
        vals = []
        for x, y in pts:
            sv = spec[ys.index(float(y))].copy()
            sv[1] -= pole  # u_2,x = omega + ...
            sv[3] += pole  # u_1,y = -omega + ...
            e = np.exp(1j * k * x)
            vals.extend([(v * e).real / np.pi for v in sv])
        return np.array(vals)

    kmax = 40 / (min(d, t - d) * min(p.imag))
    # below k t = 1e-3 the 6 x 6 system loses its digits (near rigid-body modes, errors ~ 1e-16/(k t)^2), while the
    # pole-free integrand is smooth there: [0, k0] by the trapezoid rule with f(0) extrapolated linearly
    k0 = 1e-3 / t
    f1, f2 = integrand(k0), integrand(2 * k0)
    val = 0.5 * k0 * ((2 * f1 - f2) + f1)
    part, err, info = quad_vec(integrand, k0, kmax, epsabs=1e-10, epsrel=1e-8, limit=2000, full_output=True)
    if not err < 1e-8:
        raise SystemExit(f"quad_vec did not converge: {err} {info.status} {info.neval}")
    val = val + part
    grads = []
    for j, (x, y) in enumerate(pts):
        g = val[6 * j: 6 * j + 6].copy()
        om = W / np.pi * np.arctan(x / t)
        g[1] += om
        g[3] -= om
        # local gradient G[i][l] (i: m, n, u components; l: x, y) to the crystal frame
        G = np.zeros((3, 3))
        G[:, 0] = g[0:3]
        G[:, 1] = g[3:6]
        grads.append((Rot.T @ G @ Rot).ravel().tolist())
    json.dump({"grad": grads, "W": W}, sys.stdout)


main()
