#!/usr/bin/python3
"""Reference columns through a faulted Frank loop, two-beam Howie-Whelan
equations in the column approximation, written independently of the
TypeScript code: the loop field comes from scripts/ref_loop_field.py
(scipy quad / dblquad of Burgers' formula), the column from scipy solve_ivp.

Physics (physics.md sections 3 and 5):
  dphi0/dz = -(pi/xi'0) phi0 + pi i q phig
  dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta'(z))] phig,
  q = 1/xi_g + i/xi'_g, phi0(0) = 1, phig(0) = 0, beta' = d(g.u)/dz;
the loop's displacement jumps by Delta u = u(after) - u(before) = -b where a
column crosses the loop polygon along its normal (Burgers' formula, sign as in
ref_loop_field.py); in the beta form a jump of g.u by g.Delta u multiplies
phig by exp(2 pi i g.Delta u) at that depth (the limit of a delta in beta').
beta' is sampled with the quadrature field at 122 depths (denser near the
plane, none within 0.5 nm of it, where the surface-integral form of the solid
angle's gradient is nearly singular), interpolated by one cubic spline (the
gradient is continuous across the polygon, away from the loop line), and the
ODE is integrated with DOP853 (rtol 1e-10) on each side of the crossing.

Inputs (invented case): Cu (a = 0.36149 nm, Voigt-Reuss-Hill nu =
0.34514788021147363, the project's Cu entry), g = 200 at 200 kV with
xi_g = 42.79048144851993 nm (the project's value for Cu 200, as in
scripts/ref_inclusion_columns.py), xi'_g = xi'_0 = 10 xi_g, w = 0.5; foil
50 nm, normal and beam [001], image x [100]; a hexagonal Frank loop
b = 1/3[1 1 1] on (111), centre (0, 0) at depth 25 nm, vertices (6 cos 60k,
6 sin 60k) nm on the in-plane axes e1 = unit(beam x n), e2 = n x e1 (the
README's definition). Columns at image points listed in COLUMNS.

Run:  /usr/bin/python3 scripts/ref_loop_columns.py   (a few minutes)
Writes test/reference/loop-columns.json. Needs python3-numpy, python3-scipy.
"""
import json
import math
import os
import sys

import numpy as np
from scipy.integrate import solve_ivp
from scipy.interpolate import CubicSpline

sys.path.insert(0, os.path.dirname(__file__))
from ref_loop_field import line_terms, polygon_pieces, solid_terms  # noqa: E402

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'loop-columns.json')
A_NM = 0.36149
NU = 0.34514788021147363
XI = 42.79048144851993
XIA = 10 * XI
XIA0 = 10 * XI
W = 0.5
S = W / XI
T = 50.0
DEPTH = 25.0
R = 6.0
COLUMNS = [[0.0, 0.0], [3.0, -2.0], [9.0, 1.0], [-2.0, 7.5]]
GAP = 0.5

G = np.array([2.0 / A_NM, 0.0, 0.0])
K = np.array([0.0, 0.0, 1.0])
B = np.array([1.0, 1.0, 1.0]) * A_NM / 3
N = np.array([1.0, 1.0, 1.0]) / math.sqrt(3)
E1 = np.cross(K, N)
E1 /= np.linalg.norm(E1)
E2 = np.cross(N, E1)
C = np.array([0.0, 0.0, DEPTH])
V = np.array([C + R * (math.cos(k * math.pi / 3) * E1 + math.sin(k * math.pi / 3) * E2) for k in range(6)])
PIECES, PATCHES = polygon_pieces(V)


def beta_prime(x, y, z):
    r = np.array([x, y, z])
    _, Gl = line_terms(r, B, NU, PIECES)
    _, dom = solid_terms(r, PATCHES)
    Gr = Gl - np.outer(B, dom) / (4 * math.pi)
    return float(G @ Gr @ K)


def inside(x, y):
    """Depth where the column meets the loop plane and whether it lies inside the hexagon."""
    zc = C[2] + (np.dot(C[:2] - np.array([x, y]), N[:2])) / N[2]
    h = np.array([x, y, zc]) - C
    u, v = h @ E1, h @ E2
    P = [(p @ E1, p @ E2) for p in (V - C)]
    ins = False
    for i in range(6):
        (u1, v1), (u2, v2) = P[i], P[i - 1]
        if (v1 > v) != (v2 > v) and u < (u2 - u1) * (v - v1) / (v2 - v1) + u1:
            ins = not ins
    return zc, ins


def column(x, y):
    zc, ins = inside(x, y)
    # depths: Chebyshev-like clustering towards the plane on each side
    def grid(a, b, n):
        t = (1 - np.cos(np.linspace(0, math.pi, n))) / 2
        return a + (b - a) * t
    # beta' is continuous across the polygon (its surface-integral form is nearly singular right at the
    # plane, so no sample lies within GAP of it); one spline over both sides bridges the gap
    zs = np.concatenate([grid(0.0, zc - GAP, 61), grid(zc + GAP, T, 61)])
    f = CubicSpline(zs, [beta_prime(x, y, z) for z in zs])
    f1 = f2 = f
    q = 1.0 / XI + 1j / XIA
    d0 = -math.pi / XIA0

    def rhs(f):
        def g(z, p):
            a, b = p[0] + 1j * p[1], p[2] + 1j * p[3]
            da = d0 * a + math.pi * 1j * q * b
            db = math.pi * 1j * q * a + (d0 + 2 * math.pi * 1j * (S + float(f(z)))) * b
            return [da.real, da.imag, db.real, db.imag]
        return g
    y0 = [1.0, 0.0, 0.0, 0.0]
    s1 = solve_ivp(rhs(f1), (0.0, zc), y0, method='DOP853', rtol=1e-10, atol=1e-12)
    a, b = s1.y[0, -1] + 1j * s1.y[1, -1], s1.y[2, -1] + 1j * s1.y[3, -1]
    if ins:
        b *= np.exp(2j * math.pi * float(G @ (-B)))
    s2 = solve_ivp(rhs(f2), (zc, T), [a.real, a.imag, b.real, b.imag], method='DOP853', rtol=1e-10, atol=1e-12)
    a, b = s2.y[0, -1] + 1j * s2.y[1, -1], s2.y[2, -1] + 1j * s2.y[3, -1]
    return {'x': x, 'y': y, 'crossesInside': bool(ins), 'bf': abs(a) ** 2, 'df': abs(b) ** 2}


def main():
    rows = [column(x, y) for x, y in COLUMNS]
    doc = {
        'source': 'scripts/ref_loop_columns.py (scipy solve_ivp of the two-beam Howie-Whelan equations through the quadrature loop field of scripts/ref_loop_field.py)',
        'a_nm': A_NM, 'poissonRatio': NU, 'xi_nm': XI, 'xiAbs_nm': XIA, 'w': W, 'thickness_nm': T,
        'loop': {'b': '1/3[1 1 1]', 'normal': [1, 1, 1], 'centre_nm': [0, 0, DEPTH],
                 'vertices_nm': [[round(R * math.cos(k * math.pi / 3), 12), round(R * math.sin(k * math.pi / 3), 12)] for k in range(6)]},
        'columns': rows,
    }
    with open(OUT, 'w') as f:
        json.dump(doc, f, indent=1)
        f.write('\n')
    print('wrote', OUT)
    for r in rows:
        print(r)


if __name__ == '__main__':
    main()
