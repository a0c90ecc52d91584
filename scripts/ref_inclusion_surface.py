#!/usr/bin/env python3
"""Independent reference for the free-surface correction of a centre of dilatation
(a coherent spherical inclusion seen from outside) in an isotropic foil
(src/elasticity/inclusionSurface.ts).

The correction for one free surface is the half-space solution of Mindlin & Cheng
(1950, J. Appl. Phys. 21, 926) less the infinite-medium source, written here in the
published component form (local frame: x, y along the surface, z the depth below
it, source on the z axis at depth c, R2 = sqrt(x^2 + y^2 + (z + c)^2), k = 3 - 4 nu):

    u_x = A [ k x / R2^3 - 6 x z (z + c) / R2^5 ]          (u_y likewise)
    u_z = A [ -k (z + c) / R2^3 + 2 z / R2^3 - 6 z (z + c)^2 / R2^5 ]

(the form from memory; the TypeScript tests check traction-free surface and
equilibrium separately). The TypeScript code uses a vector form with an analytic
gradient; here each surface is evaluated in its own rotated local frame (numpy,
rotation matrices built from the normal), and the gradient by complex-step
differentiation (du/dx_j = Im u(x + i h e_j) / h, h = 1e-30, exact to rounding),
a method independent of the hand-differentiated gradient in the code.

The plate 0 <= r.n <= t: entrance surface as above (depth r.n, c = n.C); exit
surface in the frame with inward normal -n (depth t - r.n, c = t - n.C). The two
are added (no repeated reflections), as the code does.

Reads JSON {"centre": [..], "A": .., "normal": [..], "t": .., "nu": .., "points": [[x, y, z], ...]}
on stdin (or --demo) and prints [{"u": [3], "grad": [9]}, ...] (grad[3 i + j] = du_i/dx_j).
"""
import json
import sys

import numpy as np


def local_frame(n):
    """Rows e1, e2, n: an orthonormal frame with n the third axis."""
    n = np.asarray(n, dtype=float)
    n = n / np.linalg.norm(n)
    trial = np.array([1.0, 0.0, 0.0]) if abs(n[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    e1 = np.cross(n, trial)
    e1 /= np.linalg.norm(e1)
    e2 = np.cross(n, e1)
    return np.array([e1, e2, n])


def half_space(p, centre, A, n, offset, nu):
    """Mindlin & Cheng correction at p (complex allowed) for the surface with inward normal n,
    depth = p.n + offset; returned in the crystal frame."""
    Q = local_frame(n)
    c = float(np.dot(Q[2], centre)) + offset
    rel = p - centre
    x = np.dot(Q[0], rel)
    y = np.dot(Q[1], rel)
    z = np.dot(Q[2], p) + offset
    k = 3.0 - 4.0 * nu
    s = z + c
    R2 = np.sqrt(x * x + y * y + s * s)
    ux = A * (k * x / R2**3 - 6.0 * x * z * s / R2**5)
    uy = A * (k * y / R2**3 - 6.0 * y * z * s / R2**5)
    uz = A * (-k * s / R2**3 + 2.0 * z / R2**3 - 6.0 * z * s * s / R2**5)
    return Q.T @ np.array([ux, uy, uz])


def plate(p, centre, A, n, t, nu):
    n = np.asarray(n, dtype=float)
    n = n / np.linalg.norm(n)
    return half_space(p, centre, A, n, 0.0, nu) + half_space(p, centre, A, -n, t, nu)


def evaluate(case):
    centre = np.asarray(case["centre"], dtype=float)
    out = []
    h = 1e-30
    for pt in case["points"]:
        p = np.asarray(pt, dtype=float)
        u = plate(p.astype(complex), centre, case["A"], case["normal"], case["t"], case["nu"]).real
        grad = np.zeros((3, 3))
        for j in range(3):
            q = p.astype(complex)
            q[j] += 1j * h
            grad[:, j] = plate(q, centre, case["A"], case["normal"], case["t"], case["nu"]).imag / h
        out.append({"u": u.tolist(), "grad": grad.reshape(9).tolist()})
    return out


if __name__ == '__main__':
    if len(sys.argv) > 1 and sys.argv[1] == '--demo':
        print(json.dumps(evaluate({"centre": [1.0, 2.0, 12.0], "A": 0.5, "normal": [0, 0, 1], "t": 50.0, "nu": 0.3,
                                   "points": [[3.0, -1.0, 0.0], [0.0, 0.0, 30.0]]})))
    else:
        print(json.dumps(evaluate(json.load(sys.stdin))))
