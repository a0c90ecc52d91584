#!/usr/bin/python3
"""Reference displacement field of a closed planar dislocation loop in an
isotropic infinite medium, by numerical quadrature of Burgers' formula,
written independently of the TypeScript code (src/elasticity/loopField.ts,
which uses closed forms per straight segment).

Burgers' formula (Hirth & Lothe 1982, Theory of Dislocations, ch. 4):

  u(r) = -(b/4pi) Omega(r) - (1/4pi) oint (b x dl')/R
         + 1/(8 pi (1-nu)) grad_r oint [b x (r' - r)] . dl' / R,    R = |r' - r|,

  Omega(r) = int_S (r - r') . dA' / |r - r'|^3,

S the flat surface bounded by the loop, dA' oriented right-handed about the
line direction dl' (the project's sign: a right-handed circuit about the line
closes to +b, physics.md section 5). The gradient du_i/dr_j is obtained by
differentiating the integrands under the integral sign (so no finite
differences):
  d/dr_j [(r - r').dA / R^3] = dA_j / R^3 - 3 ((r - r').dA) (r - r')_j / R^5,
  d/dr_j (1/R) = rho_j / R^3 with rho = r' - r,
  d/dr_j (rho_i / R^3) = -delta_ij / R^3 + 3 rho_i rho_j / R^5,
  d/dr_i [(b x rho).t] = -(b x e_i).t.
Line integrals: scipy.integrate.quad per straight segment (parameter s along
it) or over the angle of a true circle; the solid angle: scipy.integrate.dblquad
over each triangle (centroid, v_i, v_i+1) of the polygon (signed, so any simple
polygon works) or over the disc in polar coordinates.

Writes test/reference/loop-field.json: for each case the loop (vertices or
circle), b, nu and, at seeded random points at least 1 nm from the loop line,
u (nm) and grad u (row-major du_i/dr_j).

Run:  /usr/bin/python3 scripts/ref_loop_field.py   (about a minute)
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import math
import os

import numpy as np
import scipy
from scipy.integrate import dblquad, quad

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'loop-field.json')
EPS = dict(epsabs=1e-12, epsrel=1e-11, limit=400)


def line_terms(r, b, nu, pieces):
    """u and grad u of the two line integrals; pieces: list of (point(s), tangent(s) = dl'/ds, s0, s1)."""
    c2 = 1.0 / (8 * math.pi * (1 - nu))
    u = np.zeros(3)
    G = np.zeros((3, 3))
    E = np.eye(3)
    for P, T, s0, s1 in pieces:
        def rho(s):
            return P(s) - r

        def integ(fun):
            return quad(fun, s0, s1, **EPS)[0]
        for i in range(3):
            # -(1/4pi) int (b x dl')_i / R
            u[i] += -integ(lambda s: np.cross(b, T(s))[i] / np.linalg.norm(rho(s))) / (4 * math.pi)
            # c2 d/dr_i int f / R, f = (b x rho).t:  int [df_i / R + f rho_i / R^3]
            def w1(s, i=i):
                p = rho(s)
                R = np.linalg.norm(p)
                f = np.dot(np.cross(b, p), T(s))
                dfi = -np.dot(np.cross(b, E[i]), T(s))
                return dfi / R + f * p[i] / R ** 3
            u[i] += c2 * integ(w1)
            for j in range(3):
                G[i, j] += -integ(lambda s, i=i, j=j: np.cross(b, T(s))[i] * rho(s)[j] / np.linalg.norm(rho(s)) ** 3) / (4 * math.pi)

                def w2(s, i=i, j=j):
                    p = rho(s)
                    R = np.linalg.norm(p)
                    t = T(s)
                    f = np.dot(np.cross(b, p), t)
                    dfi = -np.dot(np.cross(b, E[i]), t)
                    dfj = -np.dot(np.cross(b, E[j]), t)
                    return dfi * p[j] / R ** 3 + dfj * p[i] / R ** 3 + f * (-(1.0 if i == j else 0.0) / R ** 3 + 3 * p[i] * p[j] / R ** 5)
                G[i, j] += c2 * integ(w2)
    return u, G


def solid_terms(r, patches):
    """Omega and grad Omega; patches: list of (map (a, c) -> r', dA vector (a, c), a0, a1, c0(a), c1(a))."""
    om = 0.0
    dom = np.zeros(3)
    for M, dA, a0, a1, c0, c1 in patches:
        def k(c, a):
            d = r - M(a, c)
            R = np.linalg.norm(d)
            return np.dot(d, dA(a, c)) / R ** 3
        om += dblquad(k, a0, a1, c0, c1, epsabs=1e-12, epsrel=1e-11)[0]
        for j in range(3):
            def kj(c, a, j=j):
                d = r - M(a, c)
                R = np.linalg.norm(d)
                A = dA(a, c)
                return A[j] / R ** 3 - 3 * np.dot(d, A) * d[j] / R ** 5
            dom[j] += dblquad(kj, a0, a1, c0, c1, epsabs=1e-12, epsrel=1e-11)[0]
    return om, dom


def polygon_pieces(V):
    n = len(V)
    pieces = []
    for i in range(n):
        A = V[i]
        D = V[(i + 1) % n] - A
        L = np.linalg.norm(D)
        t = D / L
        pieces.append((lambda s, A=A, t=t: A + s * t, lambda s, t=t: t, 0.0, L))
    C = V.mean(axis=0)
    patches = []
    for i in range(n):
        e1 = V[i] - C
        e2 = V[(i + 1) % n] - C
        N = np.cross(e1, e2)
        # r' = C + a e1 + c e2, 0 <= a <= 1, 0 <= c <= 1 - a ; dA = (e1 x e2) da dc
        patches.append((lambda a, c, C=C, e1=e1, e2=e2: C + a * e1 + c * e2, lambda a, c, N=N: N, 0.0, 1.0, lambda a: 0.0, lambda a: 1.0 - a))
    return pieces, patches


def circle_pieces(C, e1, e2, a):
    n = np.cross(e1, e2)
    pieces = [(lambda p: C + a * (math.cos(p) * e1 + math.sin(p) * e2), lambda p: a * (-math.sin(p) * e1 + math.cos(p) * e2), 0.0, 2 * math.pi)]
    # polar: r' = C + rr (cos p e1 + sin p e2), dA = n rr drr dp ; outer variable p, inner rr
    patches = [(lambda p, rr: C + rr * (math.cos(p) * e1 + math.sin(p) * e2), lambda p, rr: n * rr, 0.0, 2 * math.pi, lambda p: 0.0, lambda p: a)]
    return pieces, patches


def field(r, b, nu, pieces, patches):
    u, G = line_terms(r, b, nu, pieces)
    om, dom = solid_terms(r, patches)
    u = u - b * om / (4 * math.pi)
    G = G - np.outer(b, dom) / (4 * math.pi)
    return u, G


def dist_to_polyline(r, V):
    best = 1e300
    n = len(V)
    for i in range(n):
        A, B = V[i], V[(i + 1) % n]
        D = B - A
        s = min(1.0, max(0.0, np.dot(r - A, D) / np.dot(D, D)))
        best = min(best, np.linalg.norm(r - A - s * D))
    return best


def points(rng, count, V, box, min_d, plane_n, plane_p, min_plane):
    out = []
    while len(out) < count:
        r = rng.uniform(-box, box, 3) + plane_p
        if dist_to_polyline(r, V) < min_d or abs(np.dot(r - plane_p, plane_n)) < min_plane:
            continue
        out.append(r)
    return out


def main():
    rng = np.random.default_rng(20261202)
    cases = []
    nu = 0.3
    # 1: non-convex pentagon in z = 0, general b
    V1 = np.array([[-6, -5, 0], [7, -4, 0], [5, 6, 0], [0, 1, 0], [-5, 5, 0]], float)
    b1 = np.array([0.12, -0.2, 0.25])
    # 2: hexagon in a tilted plane, prismatic-like b (along the normal) plus a shear part
    n2 = np.array([1.0, 2.0, 2.0]) / 3.0
    e1 = np.cross(n2, [0, 0, 1.0]); e1 /= np.linalg.norm(e1)
    e2 = np.cross(n2, e1)
    C2 = np.array([1.0, -2.0, 3.0])
    V2 = np.array([C2 + 4.0 * (math.cos(a) * e1 + math.sin(a) * e2) for a in np.linspace(0, 2 * math.pi, 7)[:-1]])
    b2 = 0.2 * n2 + np.array([0.05, -0.05, 0.0])
    # 3: a true circle, radius 5 nm, same plane as case 2
    for name, V, b, kind in (('pentagon', V1, b1, 'polygon'), ('hexagon', V2, b2, 'polygon'), ('circle', None, b2, 'circle')):
        if kind == 'polygon':
            pieces, patches = polygon_pieces(V)
            nrm = np.cross(V[1] - V[0], V[2] - V[0]); nrm /= np.linalg.norm(nrm)
            cen = V.mean(axis=0)
            Vd = V
        else:
            pieces, patches = circle_pieces(C2, e1, e2, 5.0)
            nrm, cen = n2, C2
            Vd = np.array([C2 + 5.0 * (math.cos(a) * e1 + math.sin(a) * e2) for a in np.linspace(0, 2 * math.pi, 721)[:-1]])
        pts = points(rng, 6, Vd, 10.0, 1.0, nrm, cen, 0.5)
        rows = []
        for r in pts:
            u, G = field(r, b, nu, pieces, patches)
            rows.append({'r': r.tolist(), 'u': u.tolist(), 'grad': G.reshape(-1).tolist()})
        case = {'name': name, 'b': b.tolist(), 'nu': nu, 'points': rows}
        if kind == 'polygon':
            case['vertices'] = V.reshape(-1).tolist()
        else:
            case['circle'] = {'centre': C2.tolist(), 'e1': e1.tolist(), 'e2': e2.tolist(), 'radius': 5.0}
        cases.append(case)
    doc = {
        'source': 'scripts/ref_loop_field.py: scipy.integrate quad/dblquad of Burgers\' formula (Hirth & Lothe 1982 ch. 4)',
        'scipy': scipy.__version__,
        'numpy': np.__version__,
        'cases': cases,
    }
    with open(OUT, 'w') as f:
        json.dump(doc, f, indent=1)
        f.write('\n')
    print('wrote', OUT)


if __name__ == '__main__':
    main()
