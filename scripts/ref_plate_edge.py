#!/usr/bin/env python3
"""Independent reference for the exact isotropic plate correction of the edge component of a
straight dislocation parallel to the foil surfaces (src/elasticity/surfacePlateEdge.ts).

A different route from the TypeScript code at every step:
- loads: minus the infinite-medium edge dislocation's tractions on y = 0 and y = t, from the
  Cartesian stresses of Hirth & Lothe (1982, eq. 3-43/3-44 form, D = mu / (2 pi (1 - nu)), mu = 1):
      b_x: s_yy = D b_x Y (X^2 - Y^2) / r^4,  s_xy = D b_x X (X^2 - Y^2) / r^4
      b_y: s_yy = D b_y X (X^2 + 3 Y^2) / r^4, s_xy = D b_y Y (X^2 - Y^2) / r^4
  (X = x, Y = y - d), transformed (f^(k) = int f e^{-ikx} dx, k > 0) through the Lorentzian family
  F[a/(X^2+a^2)] = pi e^{-ak}, F[X/(X^2+a^2)] = -i pi e^{-ak} and derivatives in a and X:
      F[Y (X^2-Y^2)/r^4] = -s pi a k E,  F[X (X^2-Y^2)/r^4] = -i pi (1 - a k) E,
      F[X (X^2+3Y^2)/r^4] = -i pi (1 + a k) E,  a = |Y|, s = sign Y, E = e^{-a k}.
  (The TypeScript code instead loads the strip with the leftover tractions of the two Head images.)
- the strip: Airy function phi^ = (A + B y) cosh ky + (C + D y) sinh ky (origin on the entrance
  surface, not the mid-plane), its 4 x 4 system solved numerically per k with mpmath at 40 + 0.87 k t digits
  (the system is nearly singular in double precision at small and at large k t).
- the k integral: scipy.integrate.quad_vec (adaptive Gauss-Kronrod up to k = 45/min(d, t - d)), after taking
  off the rotation pole -i W e^{-kt}/k with W = -6 b_x d (t - d)/t^3 from beam theory
  (added back as (W/pi) atan(x/t)); the TypeScript code uses fixed Gauss-Legendre panels and a table.
- no images, no interpolation: the whole correction at each point.

Input (stdin JSON): {"bx", "by", "d", "t", "nu", "points": [[x, y], ...]} (x across the line
along the surface, y the depth); output {"grad": [[u_x,x, u_x,y, u_y,x, u_y,y], ...] of the
correction, "stress": [s_xx, s_yy, s_xy] of the infinite line at (3, d + 2) (the sign convention check)}.
"""
import json
import sys

import mpmath as mp
import numpy as np
from scipy.integrate import quad_vec

mp.mp.dps = 60


def loads(bx, by, d, t, k):
    """The correction's required (s_yy^, s_xy^) on y = 0 and y = t (minus the line's), as mpmath complex."""
    D = 1 / (2 * mp.pi * (1 - NU))
    out = []
    for ys in (0, t):
        Y = ys - d
        a = abs(Y)
        s = 1 if Y > 0 else -1
        E = mp.e ** (-a * k)
        syy = D * (bx * (-s * mp.pi * a * k * E) + by * (-1j * mp.pi * (1 + a * k) * E))
        sxy = D * (bx * (-1j * mp.pi * (1 - a * k) * E) + by * (-s * mp.pi * a * k * E))
        out.append((-syy, -sxy))
    return out


def basis(k, y):
    """phi and its y-derivatives 0..3 for the four basis functions cosh, y cosh, sinh, y sinh (coefficients A, B, C, D)."""
    c, s = mp.cosh(k * y), mp.sinh(k * y)
    ch = [c, k * s, k**2 * c, k**3 * s]
    sh = [s, k * c, k**2 * s, k**3 * c]
    ych = [y * c, c + k * y * s, 2 * k * s + k**2 * y * c, 3 * k**2 * c + k**3 * y * s]
    ysh = [y * s, s + k * y * c, 2 * k * c + k**2 * y * s, 3 * k**2 * s + k**3 * y * c]
    return [ch, ych, sh, ysh]


def spectrum(k, bx, by, d, t, ys):
    # cosh and sinh columns agree to e^{-2kt}: carry 40 digits more than that
    mp.mp.dps = 40 + int(0.87 * k * t)
    k = mp.mpf(k)
    L = loads(bx, by, d, t, k)
    # rows: -k^2 phi(ys) = s_yy, -i k phi'(ys) = s_xy (written k phi' = i s_xy: a real matrix) at ys = 0 and t
    M = mp.matrix(4, 4)
    r = mp.matrix(4, 1)
    for q, y in enumerate((0, t)):
        B = basis(k, mp.mpf(y))
        for c in range(4):
            M[2 * q, c] = -k**2 * B[c][0]
            M[2 * q + 1, c] = k * B[c][1]
        r[2 * q] = L[q][0]
        r[2 * q + 1] = 1j * L[q][1]
    coef = mp.lu_solve(M, r)
    W = -6 * bx * d * (t - d) / t**3
    S = -1j * W * mp.e ** (-k * t) / k  # the rotation pole taken off omega
    res = []
    for y in ys:
        B = basis(k, mp.mpf(y))
        ph = [sum(coef[c] * B[c][n] for c in range(4)) for n in range(4)]
        sxx, syy, sxy = ph[2], -k**2 * ph[0], -1j * k * ph[1]
        exx = ((1 - NU) * sxx - NU * syy) / 2
        eyy = ((1 - NU) * syy - NU * sxx) / 2
        exy = sxy / 2
        dexx = ((1 - NU) * ph[3] + NU * k**2 * ph[1]) / 2
        omega = exy + 1j * dexx / k  # i k omega = i k eps_xy - d eps_xx / dy
        res.append([exx, exy - (omega - S), exy + (omega - S), eyy])
    return res


def evaluate(case):
    global NU
    bx, by, d, t, NU = case["bx"], case["by"], case["d"], case["t"], case["nu"]
    pts = case["points"]
    ys = [p[1] for p in pts]
    xs = np.array([p[0] for p in pts])

    def f(k):
        sp = spectrum(k, bx, by, d, t, ys)
        out = np.empty(4 * len(pts))
        for q, row in enumerate(sp):
            e = np.exp(1j * k * xs[q])
            for c in range(4):
                out[4 * q + c] = (complex(row[c]) * e).real / np.pi
        return out

    # the transforms fall at least as e^{-k min(d, t - d)}: up to 45 / min(d, t - d) (e^{-45} ~ 3e-20)
    K = 45.0 / min(d, t - d)
    val, err = quad_vec(f, 0, K, epsabs=1e-13, epsrel=1e-11, limit=4000, points=[1.0 / t, 10.0 / t])
    W = -6 * bx * d * (t - d) / t**3
    grad = []
    for q in range(len(pts)):
        g = val[4 * q:4 * q + 4].copy()
        om = W / np.pi * np.arctan(xs[q] / t)
        g[1] -= om
        g[2] += om
        grad.append(g.tolist())
    # the infinite line's stress at X = 3, Y = 2 (Hirth & Lothe form above, plus s_xx for the check)
    D = 1 / (2 * np.pi * (1 - NU))
    X, Y = 3.0, 2.0
    r4 = (X * X + Y * Y) ** 2
    sxx = D * (-bx * Y * (3 * X * X + Y * Y) + by * X * (X * X - Y * Y)) / r4
    syy = D * (bx * Y * (X * X - Y * Y) + by * X * (X * X + 3 * Y * Y)) / r4
    sxy = D * (bx * X * (X * X - Y * Y) + by * Y * (X * X - Y * Y)) / r4
    return {"grad": grad, "stress": [sxx, syy, sxy], "error": float(np.max(err)) if np.ndim(err) else float(err)}


NU = 0.3

if __name__ == '__main__':
    if len(sys.argv) > 1 and sys.argv[1] == '--demo':
        print(json.dumps(evaluate({"bx": 0.2, "by": 0.1, "d": 8.0, "t": 60.0, "nu": 0.3, "points": [[3.0, 1.0], [-20.0, 40.0]]})))
    else:
        print(json.dumps(evaluate(json.load(sys.stdin))))
