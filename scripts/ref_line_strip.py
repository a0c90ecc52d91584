#!/usr/bin/python3
"""Reference strips of columns across a dislocation line, for the simulated
visibility verdicts (src/analysis/lineContrast.ts), written independently of
the TypeScript code.

Cu (a = 0.36149 nm, Poisson's ratio 0.34514788021147363: the project's Cu
entry, Voigt-Reuss-Hill), 200 kV, g = 020 (xi_g = 42.79048144851993 nm from the
project's reflection parameters, an INPUT here), absorption ratio 0.1,
w = 0.3, foil 100 nm thick with normal and beam [001], image x along [100].
A straight dislocation through the point at depth 50 nm below the image
centre, line u = [1 1 2]. Cases: b = 1/2[1 0 1] (g.b = 0, g.(b x u) = -0.408,
"weak residual" by the rule of thumb) and b = 1/2[1 0 -1] (g.b = 0,
g.(b x u) = -1.225).

Displacement: isotropic straight dislocation, Hirth & Lothe (1982) ch. 3 as
written in physics.md section 5 (e3 = u, e1 along the edge component,
e2 = e3 x e1). beta' = d(g.R)/dz by a central difference (h = 1e-4 nm); with
g.b = 0 the branch cut of theta drops out of g.R.
Columns: 96 columns across the projected line, centred on the line's image
point, from -H to +H with H = max(10 nm, xi_g / 2), column k at
((k + 0.5)/96 - 1/2) 2H; columns closer than 2|b| to the line (3D distance)
are left out (the strip of lineContrast.ts, specified there).
Each column: Howie-Whelan two-beam equations (beta form, physics.md section 3)
with scipy.integrate.solve_ivp DOP853 rtol 1e-10 atol 1e-12, split at the
depth of closest approach to the line.

Output test/reference/line-strips.json: per case the peak |I/I0 - 1| in
bright and dark field, and the range of I/I0 in bright field (I0: perfect crystal).

Run:  /usr/bin/python3 scripts/ref_line_strip.py
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy.integrate import solve_ivp

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'line-strips.json')

A_NM = 0.36149
NU = 0.34514788021147363
XI = 42.79048144851993
XIA = 10 * XI
T = 100.0
W = 0.3
S = W / XI
G = np.array([0.0, 2.0, 0.0]) / A_NM
P = np.array([0.0, 0.0, 50.0])
U = np.array([1.0, 1.0, 2.0]) / math.sqrt(6)
NCOL = 96


def displacement(r, b):
    """Hirth & Lothe isotropic straight dislocation, physics.md section 5."""
    be = b - (b @ U) * U
    e1 = be / np.linalg.norm(be)
    e2 = np.cross(U, e1)
    d = r - P
    x = d @ e1
    y = d @ e2
    r2 = x * x + y * y
    th = math.atan2(y, x)
    nb = np.linalg.norm(be)
    R1 = nb / (2 * math.pi) * (th + x * y / (2 * (1 - NU) * r2))
    R2 = -nb / (2 * math.pi) * ((1 - 2 * NU) / (4 * (1 - NU)) * math.log(r2) + (x * x - y * y) / (4 * (1 - NU) * r2))
    R3 = (b @ U) / (2 * math.pi) * th
    return R1 * e1 + R2 * e2 + R3 * U


def column(x, y, b, strained=True):
    q = 1 / XI + 1j / XIA
    d0 = -math.pi / XIA
    piq = math.pi * 1j * q
    h = 1e-4

    def gR(z):
        return G @ displacement(np.array([x, y, z]), b)

    def rhs(z, u):
        bp = (gR(z + h) - gR(z - h)) / (2 * h) if strained else 0.0
        return np.array([d0 * u[0] + piq * u[1], piq * u[0] + (d0 + 2j * math.pi * (S + bp)) * u[1]])

    # depth of closest approach of the column (x, y, z) to the line P + l U
    w0 = np.array([x, y, 0.0]) - P
    k = np.array([0.0, 0.0, 1.0])
    bk = k @ U
    zc = (bk * (U @ w0) - (k @ w0)) / (1 - bk * bk)
    cuts = sorted({0.0, T} | ({zc} if 0 < zc < T and strained else set()))
    u = np.array([1.0 + 0j, 0j])
    for a, c in zip(cuts[:-1], cuts[1:]):
        sol = solve_ivp(rhs, (a, c), u, method='DOP853', rtol=1e-10, atol=1e-12)
        if not sol.success:
            raise RuntimeError(sol.message)
        u = sol.y[:, -1]
    return abs(u[0]) ** 2, abs(u[1]) ** 2


def strip(b_lattice):
    b = np.array(b_lattice) * A_NM
    H = max(10.0, XI / 2)
    # strip direction across the projected line (image x = [100], y = [010], beam [001])
    dx, dy = -U[1], U[0]
    n = math.hypot(dx, dy)
    dx, dy = dx / n, dy / n
    i0b, i0d = column(0.0, 0.0, b, strained=False)
    nvec = np.cross([0.0, 0.0, 1.0], U)
    nvec /= np.linalg.norm(nvec)
    bf = df = 0.0
    lo, hi = math.inf, -math.inf
    cols = 0
    for kk in range(NCOL):
        t = ((kk + 0.5) / NCOL - 0.5) * 2 * H
        x, y = t * dx, t * dy
        dist = abs((np.array([x, y, 0.0]) - P) @ nvec)
        if dist < 2 * np.linalg.norm(b):
            continue
        ib, idf = column(x, y, b)
        qb = ib / i0b
        lo, hi = min(lo, qb), max(hi, qb)
        bf = max(bf, abs(qb - 1))
        df = max(df, abs(idf / i0d - 1))
        cols += 1
    return {'b': list(b_lattice), 'bf': bf, 'df': df, 'bfRange': [lo, hi], 'columns': cols, 'halfWidth_nm': H}


def main():
    cases = [strip([0.5, 0.0, 0.5]), strip([0.5, 0.0, -0.5])]
    out = {
        'source': 'scripts/ref_line_strip.py: scipy.integrate.solve_ivp DOP853 rtol 1e-10, Hirth & Lothe isotropic field; scipy '
                  + scipy.__version__ + ', numpy ' + np.__version__,
        'material': 'Cu', 'a_nm': A_NM, 'poissonRatio': NU, 'g': [0, 2, 0], 'xi_nm': XI, 'w': W, 'thickness_nm': T,
        'line': [1, 1, 2], 'depth_nm': 50.0, 'cases': cases,
    }
    with open(OUT, 'w') as f:
        json.dump(out, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
