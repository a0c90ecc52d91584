#!/usr/bin/env python3
"""Independent Stroh (sextic) solution of a straight dislocation, with numpy's
general eigen-solver (numpy.linalg.eig), written separately from
src/elasticity/anisotropicDislocation.ts (which uses a Schur form).

Conventions (physics.md section 5; Hirth & Lothe 1982 ch. 13): t = unit line,
m = unit, perpendicular to t (the cut lies along -m), n = t x m,
(ab)_jk = a_i C_ijkl b_l, N = [[-T^-1 R^T, T^-1], [R T^-1 R^T - Q, -R T^-1]],
keep the three p with Im p > 0, normalise 2 a.L = 1 and
    R(x) = (1/pi) Im sum a (L.b) ln(m.x + p n.x),
energy-factor matrix K = 2 Im sum L L^T (E/L = b.K.b/(4 pi) ln(R/r0)).
Displacements are compared as differences R(x) - R(x_ref) (the constant is a
convention). Random crystals: cubic, hexagonal and triclinic (a random
positive-definite 6 x 6 matrix), random lines, Burgers vectors and points.

Usage: python3 scripts/ref_stroh.py > test/reference/stroh.json
  or:  python3 scripts/ref_stroh.py --stdin  (cases from stdin, results to stdout)
"""
import json
import sys

import numpy as np

VOIGT = [[0, 5, 4], [5, 1, 3], [4, 3, 2]]


def tensor(voigt):
    V = np.array(voigt, dtype=float).reshape(6, 6)
    C = np.zeros((3, 3, 3, 3))
    for i in range(3):
        for j in range(3):
            for k in range(3):
                for l in range(3):
                    C[i, j, k, l] = V[VOIGT[i][j], VOIGT[k][l]]
    return C


def solve(voigt, line, mdir, b):
    C = tensor(voigt)
    t = np.array(line, float)
    t /= np.linalg.norm(t)
    m = np.array(mdir, float)
    m -= t * (m @ t)
    m /= np.linalg.norm(m)
    n = np.cross(t, m)
    ab = lambda a, c: np.einsum('i,ijkl,l->jk', a, C, c)
    Q, R, T = ab(m, m), ab(m, n), ab(n, n)
    Ti = np.linalg.inv(T)
    N = np.block([[-Ti @ R.T, Ti], [R @ Ti @ R.T - Q, -R @ Ti]])
    p, X = np.linalg.eig(N)
    keep = np.where(p.imag > 0)[0]
    assert len(keep) == 3
    p = p[keep]
    a = X[:3, keep]
    L = X[3:, keep]
    for k in range(3):
        s = np.sqrt(2 * (a[:, k] @ L[:, k]))
        a[:, k] /= s
        L[:, k] /= s
    b = np.array(b, float)
    K = 2 * np.imag(L @ L.T)
    return dict(t=t, m=m, n=n, p=p, a=a, L=L, b=b, K=K)


def disp(s, x):
    z = (s['m'] @ x) + s['p'] * (s['n'] @ x)
    return np.imag(s['a'] @ ((s['L'].T @ s['b']) * np.log(z))) / np.pi


def grad(s, x):
    z = (s['m'] @ x) + s['p'] * (s['n'] @ x)
    w = (s['L'].T @ s['b']) / z
    out = np.zeros((3, 3))
    for j in range(3):
        out[:, j] = np.imag(s['a'] @ (w * (s['m'][j] + s['p'] * s['n'][j]))) / np.pi
    return out


def random_cases(seed=20261202, count=24):
    rng = np.random.default_rng(seed)
    cases = []
    for k in range(count):
        kind = ['cubic', 'hexagonal', 'triclinic'][k % 3]
        if kind == 'cubic':
            c44 = rng.uniform(20, 150)
            c12 = rng.uniform(30, 150)
            c11 = c12 + rng.uniform(20, 200)
            V = np.zeros((6, 6))
            V[:3, :3] = c12
            np.fill_diagonal(V[:3, :3], c11)
            V[3, 3] = V[4, 4] = V[5, 5] = c44
        elif kind == 'hexagonal':
            c11 = rng.uniform(60, 300)
            c12 = rng.uniform(10, 0.8 * c11)
            c33 = rng.uniform(50, 350)
            c13 = rng.uniform(10, 0.6 * np.sqrt(c33 * (c11 + c12) / 2))
            c44 = rng.uniform(15, 100)
            V = np.zeros((6, 6))
            V[0, 0] = V[1, 1] = c11
            V[0, 1] = V[1, 0] = c12
            V[0, 2] = V[2, 0] = V[1, 2] = V[2, 1] = c13
            V[2, 2] = c33
            V[3, 3] = V[4, 4] = c44
            V[5, 5] = (c11 - c12) / 2
        else:
            M = rng.normal(size=(6, 6))
            V = 30 * (M @ M.T) / 6 + 40 * np.eye(6)
        if np.min(np.linalg.eigvalsh(V)) <= 1:
            continue
        line = rng.normal(size=3)
        mdir = rng.normal(size=3)
        b = rng.normal(size=3) * 0.2
        ref = rng.normal(size=3) * 3
        pts = [list(rng.normal(size=3) * 3) for _ in range(6)]
        cases.append(dict(kind=kind, voigt=V.flatten().tolist(), line=line.tolist(), mdir=mdir.tolist(), b=b.tolist(), ref=ref.tolist(), points=pts))
    return cases


def evaluate(cases):
    out = []
    for c in cases:
        s = solve(c['voigt'], c['line'], c['mdir'], c['b'])
        ref = np.array(c['ref'])
        r0 = disp(s, ref)
        res = []
        for x in c['points']:
            x = np.array(x)
            res.append(dict(dR=(disp(s, x) - r0).tolist(), grad=grad(s, x).flatten().tolist()))
        out.append(dict(c, results=res, K=s['K'].flatten().tolist(), p=[[z.real, z.imag] for z in s['p']]))
    return out


if __name__ == '__main__':
    if '--stdin' in sys.argv:
        print(json.dumps(evaluate(json.load(sys.stdin))))
    else:
        json.dump(dict(
            about='Stroh sextic solution by numpy.linalg.eig (scripts/ref_stroh.py); numpy ' + np.__version__,
            cases=evaluate(random_cases())), sys.stdout, indent=1)
        sys.stdout.write('\n')
