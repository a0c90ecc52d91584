#!/usr/bin/python3
"""Reference intensity profiles across straight dislocations and Shockley
partials, two-beam, written independently of the TypeScript code.

Method: the Howie-Whelan equations in the alpha form (physics.md section 3,
Hirsch et al. 1965), with the phase alpha(z) = 2 pi g.R(z) of the full
displacement along the column,

    dphi0/dz = -(pi/xi'0) phi0 + pi i q e^{+i alpha} phig
    dphig/dz =  pi i q e^{-i alpha} phi0 + [-(pi/xi'0) + 2 pi i s] phig,

so no derivative of R is needed and a jump of R (the cut of a partial, which
lies along the fault it bounds: physics.md section 5) is a jump of alpha.
scipy.integrate.solve_ivp DOP853, rtol 1e-10, atol 1e-12, split at the depth
of closest approach to the line and where the column crosses the cut.
R: isotropic straight dislocation, Hirth & Lothe (1982) ch. 3 as written in
physics.md section 5 (e3 = u, e1 along the edge component, e2 = e3 x e1),
with theta measured from the cut direction c (in (0, 2 pi)), so that the
branch jump lies on the half-plane from the line along c; for a perfect
dislocation any cut gives the same intensities.

Inputs (Cu, the project's entry: a = 0.36149 nm, Poisson's ratio
0.34514788021147363; 200 kV; xi_g from the project's reflection parameters
(an INPUT here): 200 and 020 42.79048144851993 nm, 220 60.541908328404475 nm;
absorption ratio 0.1; beam and foil normal [001]; image x along [100]):
  - "width": edge b = 1/2[1 0 1] along [0 1 0] at depth 50 nm, t = 160 nm,
    g = 200, s = 0; dark field at 400 columns x = (i + 0.5 - 200) 0.25 nm.
  - "partials": Shockley partial along [1 -1 0] at depth 50 nm bounding a
    fault on (111) towards [-1 -1 2], t = 100 nm, w = 0.5, for (g, b) =
    (200, 1/6[1 1 -2]), (200, 1/6[-2 1 1]), (020, 1/6[-2 1 1]),
    (020, 1/6[1 -2 1]), (220, 1/6[1 -2 1]), (220, 1/6[1 1 -2]); bright field
    at 80 columns x = (i + 0.5 - 40) 0.5 nm, y = 0.

Writes test/reference/dislocation-profiles.json.
Run:  /usr/bin/python3 scripts/ref_dislocation_profiles.py
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy.integrate import solve_ivp

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'dislocation-profiles.json')
A_NM = 0.36149
NU = 0.34514788021147363
XI = {'200': 42.79048144851993, '020': 42.79048144851993, '220': 60.541908328404475}
K = np.array([0.0, 0.0, 1.0])


def unit(v):
    v = np.asarray(v, dtype=float)
    return v / np.linalg.norm(v)


def dislocation(b_lat, u_lat, p, cut=None):
    """R(r) of a straight dislocation (Hirth & Lothe), cut along unit vector `cut` (default -e1)."""
    b = np.asarray(b_lat, dtype=float) * A_NM
    u = unit(u_lat)
    be = b - (b @ u) * u
    e1 = unit(be)
    e2 = np.cross(u, e1)
    nbe = np.linalg.norm(be)
    c = -e1 if cut is None else unit(np.asarray(cut) - (np.asarray(cut) @ u) * u)
    phic = math.atan2(c @ e2, c @ e1)

    def R(r):
        d = r - p
        x = d @ e1
        y = d @ e2
        r2 = x * x + y * y
        # theta from the cut direction, in (0, 2 pi): the branch jump lies on the half-plane along c
        th = phic + (math.atan2(y, x) - phic) % (2 * math.pi)
        R1 = nbe / (2 * math.pi) * (th + x * y / (2 * (1 - NU) * r2))
        R2 = -nbe / (2 * math.pi) * ((1 - 2 * NU) / (4 * (1 - NU)) * math.log(r2) + (x * x - y * y) / (4 * (1 - NU) * r2))
        R3 = (b @ u) / (2 * math.pi) * th
        return R1 * e1 + R2 * e2 + R3 * u

    return R, u, c


def column(x, y, g, R, xi, s, t, cuts):
    q = 1 / xi + 1j / (10 * xi)
    d0 = -math.pi / (10 * xi)
    piq = math.pi * 1j * q

    def rhs(z, v):
        a = 2 * math.pi * (g @ R(np.array([x, y, z])))
        e = complex(math.cos(a), math.sin(a))
        return np.array([d0 * v[0] + piq * e * v[1], piq * e.conjugate() * v[0] + (d0 + 2j * math.pi * s) * v[1]])

    zs = sorted({0.0, t} | {z for z in cuts if 0 < z < t})
    v = np.array([1.0 + 0j, 0j])
    for a, b in zip(zs[:-1], zs[1:]):
        # just inside each piece, so that R on a cut is taken from the right side
        sol = solve_ivp(rhs, (a, b), v, method='DOP853', rtol=1e-10, atol=1e-12)
        if not sol.success:
            raise RuntimeError(sol.message)
        v = sol.y[:, -1]
    return abs(v[0]) ** 2, abs(v[1]) ** 2


def width_case():
    g = np.array([2.0, 0, 0]) / A_NM
    p = np.array([0.0, 0.0, 50.0])
    R, _, _ = dislocation([0.5, 0, 0.5], [0, 1, 0], p)
    be = unit([1, 0, 1])
    df = []
    for i in range(400):
        x = (i + 0.5 - 200) * 0.25
        # the default cut runs along -e1 = -(1 0 1)/sqrt2: the column x < 0 meets it at depth 50 + x (g.b = 1: no phase)
        cuts = [50.0] + ([50.0 - x * be[2] / be[0]] if x < 0 else [])
        df.append(column(x, -0.125, g, R, XI['200'], 0.0, 160.0, cuts)[1])
    bg = column(0, 0, g, lambda r: np.zeros(3), XI['200'], 0.0, 160.0, [])[1]
    return {'g': [2, 0, 0], 'b': [0.5, 0, 0.5], 'line': [0, 1, 0], 'depth_nm': 50, 'thickness_nm': 160, 'pixel_nm': 0.25,
            'dfBackground': bg, 'df': df}


def partial_cases():
    out = []
    p = np.array([0.0, 0.0, 50.0])
    n = unit([1, 1, 1])
    for g_lat, b_lat in (([2, 0, 0], [1 / 6, 1 / 6, -1 / 3]), ([2, 0, 0], [-1 / 3, 1 / 6, 1 / 6]),
                         ([0, 2, 0], [-1 / 3, 1 / 6, 1 / 6]), ([0, 2, 0], [1 / 6, -1 / 3, 1 / 6]),
                         ([2, 2, 0], [1 / 6, -1 / 3, 1 / 6]), ([2, 2, 0], [1 / 6, 1 / 6, -1 / 3])):
        key = ''.join(str(h) for h in g_lat)
        g = np.array(g_lat, dtype=float) / A_NM
        xi = XI[key]
        s = 0.5 / xi
        R, u, c = dislocation(b_lat, [1, -1, 0], p, cut=[-1, -1, 2])
        bf = []
        for i in range(80):
            x = (i + 0.5 - 40) * 0.5
            cuts = [50.0]
            # crossing of the fault plane n.(r - p) = 0 by the column (x, 0, z), inside the half-plane along c
            zc = 50.0 - (n[0] * x) / n[2]
            if (np.array([x, 0.0, zc]) - p) @ c > 0:
                cuts.append(zc)
            bf.append(column(x, 0.0, g, R, xi, s, 100.0, cuts)[0])
        out.append({'g': g_lat, 'b': b_lat, 'w': 0.5, 'bf': bf})
    return out


def main():
    res = {
        'source': 'scripts/ref_dislocation_profiles.py: alpha-form Howie-Whelan equations, scipy.integrate.solve_ivp DOP853 rtol 1e-10, '
                  'Hirth & Lothe isotropic field with the cut along the fault; scipy ' + scipy.__version__ + ', numpy ' + np.__version__,
        'material': 'Cu', 'a_nm': A_NM, 'poissonRatio': NU,
        'width': width_case(),
        'partials': partial_cases(),
    }
    with open(OUT, 'w') as f:
        json.dump(res, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
