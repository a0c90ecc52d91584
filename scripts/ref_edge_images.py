#!/usr/bin/env python3
"""Independent reference for the half-space images of the edge component of a straight
dislocation parallel to the foil surfaces (src/elasticity/surfaceEdgeImages.ts).

Method: the general half-plane theorem of plane elasticity (complex potentials,
Muskhelishvili 1953, ch. 5): for the half-plane y > 0 with a traction-free boundary
y = 0 and a source field with potentials phi0, psi0 (singular in y > 0 only), the
correction that frees the boundary is
    phi1(z) = -psi0b(z) - z phi0b'(z),      psi1(z) = -phi0b(z) - z phi1'(z),
with fb(z) = conj(f(conj(z))) (its singularities lie in y < 0). It follows from
sigma_yy + i sigma_xy = Phi + conj(Phi) + conj(z) Phi' + Psi = 0 on y = 0 by
splitting the terms holomorphic in y > 0 from those holomorphic in y < 0. The
TypeScript code instead matches coefficients of an ansatz term by term and
differentiates by hand; here the theorem is applied to the infinite-medium
potentials as functions (numpy complex arithmetic) and the displacement gradient
is taken by central finite differences with Richardson extrapolation.

Infinite edge dislocation at a = i d (mu = 1, kappa = 3 - 4 nu):
    phi0 = g log(z - a),  psi0 = conj(g) log(z - a) - g conj(a) / (z - a),
    g = (bx + i by) / (pi i (kappa + 1)),  2 mu (u_x + i u_y) = kappa phi - z conj(phi') - conj(psi).

The foil 0 <= y <= t: the entrance surface as above, the exit surface in the frame
turned by pi (x' = -x, y' = t - y, b' = -b); the two corrections are added.

Input (stdin JSON): {"bx", "by", "d", "t", "nu", "points": [[x, y], ...]} (x across the
line along the surface, y the depth); output: [[u_x,x, u_x,y, u_y,x, u_y,y], ...].
"""
import json
import sys

import numpy as np


def correction(bx, by, d, nu):
    """Displacement (u_x, u_y) of the half-space correction as a function of complex z."""
    kappa = 3.0 - 4.0 * nu
    g = (bx + 1j * by) / (np.pi * 1j * (kappa + 1.0))
    a = 1j * d

    def phi0(z):
        return g * np.log(z - a)

    def dphi0(z):
        return g / (z - a)

    def d2phi0(z):
        return -g / (z - a) ** 2

    def psi0(z):
        return np.conj(g) * np.log(z - a) - g * np.conj(a) / (z - a)

    def dpsi0(z):
        return np.conj(g) / (z - a) + g * np.conj(a) / (z - a) ** 2

    def bar(f):
        return lambda z: np.conj(f(np.conj(z)))

    phi0b, dphi0b, d2phi0b, psi0b, dpsi0b = bar(phi0), bar(dphi0), bar(d2phi0), bar(psi0), bar(dpsi0)

    def phi1(z):
        return -psi0b(z) - z * dphi0b(z)

    def dphi1(z):
        return -dpsi0b(z) - dphi0b(z) - z * d2phi0b(z)

    def psi1(z):
        return -phi0b(z) - z * dphi1(z)

    def u(x, y):
        z = x + 1j * y
        D = kappa * phi1(z) - z * np.conj(dphi1(z)) - np.conj(psi1(z))
        return 0.5 * D.real, 0.5 * D.imag

    return u


def gradient(u, x, y, h):
    """Central differences, Richardson-extrapolated (h and h/2): [u_x,x, u_x,y, u_y,x, u_y,y]."""
    def cd(hh):
        ux1, uy1 = u(x + hh, y)
        ux0, uy0 = u(x - hh, y)
        vx1, vy1 = u(x, y + hh)
        vx0, vy0 = u(x, y - hh)
        return np.array([(ux1 - ux0), (vx1 - vx0), (uy1 - uy0), (vy1 - vy0)]) / (2 * hh)
    return (4 * cd(h / 2) - cd(h)) / 3


def evaluate(case):
    bx, by, d, t, nu = case["bx"], case["by"], case["d"], case["t"], case["nu"]
    top = correction(bx, by, d, nu)
    bottom = correction(-bx, -by, t - d, nu)
    out = []
    for x, y in case["points"]:
        h = 1e-3 * min(y + d, 2 * t - d - y)  # a small fraction of the distance to the nearer image line
        g = gradient(top, x, y, h) + gradient(bottom, -x, t - y, h)  # a turn by pi leaves the 2 x 2 gradient unchanged
        out.append(g.tolist())
    return out


if __name__ == '__main__':
    if len(sys.argv) > 1 and sys.argv[1] == '--demo':
        print(json.dumps(evaluate({"bx": 0.2, "by": 0.1, "d": 8.0, "t": 60.0, "nu": 0.3, "points": [[3.0, 1.0], [-20.0, 40.0]]})))
    else:
        print(json.dumps(evaluate(json.load(sys.stdin))))
