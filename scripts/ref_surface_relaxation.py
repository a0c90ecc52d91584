#!/usr/bin/env python3
"""Independent reference for the free-surface corrections of straight screw
dislocations in an isotropic plate 0 <= z <= t (src/elasticity/surfaceRelaxation.ts).

Two cases, each computed by a different method than the TypeScript code:

* "normal": screw along the plate normal (Eshelby & Stroh 1951). The azimuthal
  correction is written as the Hankel integral
      u_theta(r, z) = -(B/2pi) int_0^inf J1(k r) sinh(k (z - t/2)) / (k cosh(k t/2)) dk
  (the twist that cancels sigma_theta z = G B / (2 pi r) on both faces), and
  evaluated here by adaptive quadrature (scipy.integrate.quad with scipy.special.j1),
  together with d u_theta / dz and d u_theta / dr. The TypeScript code sums the
  image series of half-space twists instead.

* "parallel": screw parallel to the faces at depth z0. The correction is the sum
  of the antiplane fields of the image screws (+B at z0 + 2 m t, -B at -z0 + 2 m t,
  the real line m = 0 left out), summed directly here with numpy over |m| <= M (and 2M, extrapolated).
  The TypeScript code uses the closed-form lattice sums.

Reads a JSON list of cases on stdin (or runs a small demonstration with no input
when called with --demo) and prints the results as JSON.
"""
import json
import math
import sys

import numpy as np
from scipy import integrate, special


def twist(r, z, t, B):
    """u_theta, d u_theta/dr, d u_theta/dz of the plate twist (Hankel integral by quadrature)."""
    kmax = 60.0 / min(z, t - z)
    den = lambda k: 1.0 + math.exp(-k * t)
    sh = lambda k: (math.exp(k * (z - t)) - math.exp(-k * z)) / den(k)  # sinh(k(z - t/2)) / cosh(k t/2)
    ch = lambda k: (math.exp(k * (z - t)) + math.exp(-k * z)) / den(k)  # cosh(k(z - t/2)) / cosh(k t/2)
    opts = dict(limit=5000, epsabs=1e-13, epsrel=1e-11)
    u = integrate.quad(lambda k: special.j1(k * r) * sh(k) / k, 0, kmax, **opts)[0]
    uz = integrate.quad(lambda k: special.j1(k * r) * ch(k), 0, kmax, **opts)[0]
    ur = integrate.quad(lambda k: special.jvp(1, k * r) * sh(k), 0, kmax, **opts)[0]
    c = -B / (2 * math.pi)
    return c * u, c * ur, c * uz


def images(xi, z, z0, t, B, M=200000):
    """dw/dxi, dw/dz of the image screws (real line left out): direct sums over |m| <= M and 2M,
    the 1/M tail removed by Richardson extrapolation (S = 2 S(2M) - S(M))."""
    a = images_direct(xi, z, z0, t, B, M)
    b = images_direct(xi, z, z0, t, B, 2 * M)
    return 2 * b[0] - a[0], 2 * b[1] - a[1]


def images_direct(xi, z, z0, t, B, M):
    """The direct sums over |m| <= M."""
    m = np.arange(-M, M + 1, dtype=np.float64)
    zp = z0 + 2 * m * t  # +B
    zn = -z0 + 2 * m * t  # -B
    zp = zp[m != 0]
    dzp = z - zp
    dzn = z - zn
    rp = xi * xi + dzp * dzp
    rn = xi * xi + dzn * dzn
    # theta = atan2(z - zm, xi): d/dxi = -(z - zm)/rho^2, d/dz = xi/rho^2
    # pair the terms symmetric in m to keep the conditionally convergent sums symmetric
    dxi = -np.sum(dzp / rp) + np.sum(dzn / rn)
    dz = np.sum(xi / rp) - np.sum(xi / rn)
    c = B / (2 * math.pi)
    return c * dxi, c * dz


def evaluate(cases):
    out = []
    for c in cases:
        if c["kind"] == "normal":
            u, ur, uz = twist(c["r"], c["z"], c["t"], c["B"])
            out.append({"u": u, "ur": ur, "uz": uz})
        else:
            dxi, dz = images(c["xi"], c["z"], c["z0"], c["t"], c["B"])
            out.append({"dxi": dxi, "dz": dz})
    return out


if __name__ == '__main__':
    if len(sys.argv) > 1 and sys.argv[1] == '--demo':
        print(json.dumps(evaluate([
            {"kind": "normal", "r": 3.0, "z": 10.0, "t": 50.0, "B": 0.25},
            {"kind": "parallel", "xi": 4.0, "z": 3.0, "z0": 10.0, "t": 50.0, "B": 0.25},
        ])))
    else:
        print(json.dumps(evaluate(json.load(sys.stdin))))
