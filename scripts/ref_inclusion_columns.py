#!/usr/bin/python3
"""Reference image of a coherent spherical inclusion, two-beam, column
approximation, written independently of the TypeScript code.

Writes test/reference/inclusion-columns.json: bright- and dark-field
intensities of a 24 x 24 grid of columns (1 nm apart, column centres at
x, y = -11.5 .. 11.5 nm) through a Cu foil with an inclusion.

Physics (physics.md sections 3 and 5):
  - Howie-Whelan two-beam equations, beta form,
        dphi0/dz = -(pi/xi'0) phi0 + pi i q phig
        dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta'(z))] phig
        q = 1/xi_g + i/xi'_g,  phi0(0) = 1, phig(0) = 0;
  - Ashby & Brown (1963) field of a coherent sphere of radius r0,
        R = eps r (r <= r0),   R = eps r0^3 r / r^3 (r > r0),
    eps = delta (1 + nu) / (3 (1 - nu)) (Eshelby 1957), so along a column
    r(z) = (x, y, z - zc) with unit direction k:
        beta' = g.(dR/dz) = eps g.k                           inside
        beta' = eps r0^3 (g.k / r^3 - 3 (g.r)(k.r) / r^5)     outside;
  - the ODE is solved with scipy.integrate.solve_ivp (DOP853, rtol 1e-11,
    atol 1e-12) piecewise, split at the depths where the column enters and
    leaves the sphere (beta' jumps there), so the solver never steps over the
    jump.

Inputs (the case of the audit: r0 4 nm, centre depth 8 nm, misfit 0.02,
g = 200, w = 0, beam [001] normal to g):
  - material Cu: a = 0.36149 nm and Poisson's ratio 0.34514788021147363,
    the values of the project's Cu entry (data/materials.json; the ratio is
    its Voigt-Reuss-Hill average);
  - xi_g = 42.79048144851993 nm, xi'_g = xi'_0 = 10 xi_g: the extinction
    distance the project computes for Cu 200 at 200 kV from the International
    Tables Vol. C factors (tested elsewhere against gemmi), absorption ratio 0.1.
These reflection numbers are INPUTS of this check, which tests the column
integration through the inclusion field, not the extinction distance.
Thickness 50 nm (chosen).

Run:  /usr/bin/python3 scripts/ref_inclusion_columns.py
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy.integrate import solve_ivp

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'inclusion-columns.json')

A_NM = 0.36149
NU = 0.34514788021147363
XI = 42.79048144851993
XIA = 10 * XI
XIA0 = 10 * XI
S = 0.0
T = 50.0
R0 = 4.0
ZC = 8.0
MISFIT = 0.02
N = 24
PIX = 1.0

EPS = MISFIT * (1 + NU) / (3 * (1 - NU))
G = np.array([2.0 / A_NM, 0.0, 0.0])   # g = 200 in nm^-1 (cubic)
K = np.array([0.0, 0.0, 1.0])          # column direction (beam [001])


def beta_prime(x, y, z):
    r = np.array([x, y, z - ZC])
    r2 = float(r @ r)
    gk = float(G @ K)
    if r2 <= R0 * R0:
        return EPS * gk
    rr = math.sqrt(r2)
    return EPS * R0 ** 3 * (gk / rr ** 3 - 3 * float(G @ r) * float(K @ r) / rr ** 5)


def column(x, y, strained=True):
    q = 1.0 / XI + 1j / XIA
    d0 = -math.pi / XIA0
    piq = math.pi * 1j * q

    def rhs(z, u):
        se = S + (beta_prime(x, y, z) if strained else 0.0)
        return np.array([d0 * u[0] + piq * u[1], piq * u[0] + (d0 + 2j * math.pi * se) * u[1]])

    cuts = [0.0, T]
    d2 = R0 * R0 - x * x - y * y
    if strained and d2 > 0:
        h = math.sqrt(d2)
        cuts += [z for z in (ZC - h, ZC + h) if 0 < z < T]
    cuts = sorted(cuts)
    u = np.array([1.0 + 0j, 0j])
    for a, b in zip(cuts[:-1], cuts[1:]):
        sol = solve_ivp(rhs, (a, b), u, method='DOP853', rtol=1e-11, atol=1e-12)
        if not sol.success:
            raise RuntimeError(sol.message)
        u = sol.y[:, -1]
    return float(abs(u[0]) ** 2), float(abs(u[1]) ** 2)


def main():
    bf = []
    df = []
    xs = [(i + 0.5 - N / 2) * PIX for i in range(N)]
    for y in xs:
        for x in xs:
            a, b = column(x, y)
            bf.append(a)
            df.append(b)
    bg = column(0.0, 0.0, strained=False)  # the perfect crystal
    out = {
        'source': 'scripts/ref_inclusion_columns.py: scipy.integrate.solve_ivp DOP853 rtol 1e-11, split at the sphere surface; '
                  'Ashby & Brown 1963 field; scipy ' + scipy.__version__ + ', numpy ' + np.__version__,
        'material': 'Cu', 'a_nm': A_NM, 'poissonRatio': NU, 'g': [2, 0, 0], 'kV': 200,
        'xi_nm': XI, 'xiAbs_nm': XIA, 'xiAbs0_nm': XIA0, 's_per_nm': S, 'thickness_nm': T,
        'radius_nm': R0, 'centreDepth_nm': ZC, 'misfit': MISFIT, 'strain': EPS,
        'width_px': N, 'height_px': N, 'pixel_nm': PIX,
        'background': {'bf': bg[0], 'df': bg[1]},
        'bf': bf, 'df': df,
    }
    with open(OUT, 'w') as f:
        json.dump(out, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
