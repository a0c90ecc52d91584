#!/usr/bin/env python3
"""Reference eigen-decompositions for the many-beam engine's complex eigen-solver.

Writes test/reference/manybeam-eigen.json with:
  - random complex 7x7 and 15x15 matrices (numpy seed 20240611) and their
    eigenvalues / right eigenvectors from scipy.linalg.eig (LAPACK zgeev);
  - a 7-beam systematic-row structure matrix with absorption, built here from
    physics.md section 4 (A_gg = s_g + i U'_0/(2K), A_gh = (U_{g-h} + i U'_{g-h})/(2K)),
    with INVENTED test inputs (not measured data), and its eigen-decomposition.

Run:  /usr/bin/python3 scripts/ref_manybeam_eigen.py
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import os

import numpy as np
import scipy
import scipy.linalg as sl

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'manybeam-eigen.json')


def cm(a):
    """complex matrix -> row-major re/im lists"""
    a = np.asarray(a)
    return {'re': a.real.ravel().tolist(), 'im': a.imag.ravel().tolist()}


def case(name, a, extra=None):
    w, v = sl.eig(a)
    # normalise each eigenvector to unit 2-norm (zgeev already does; be explicit)
    v = v / np.linalg.norm(v, axis=0)
    d = {'name': name, 'n': int(a.shape[0]), 'matrix': cm(a),
         'values': {'re': w.real.tolist(), 'im': w.imag.tolist()},
         'vectors': cm(v)}
    if extra:
        d.update(extra)
    return d


def main():
    rng = np.random.default_rng(20240611)
    cases = []
    for n in (7, 15):
        a = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
        cases.append(case(f'random{n}', a))

    # 7-beam systematic row -3..3 (invented test inputs)
    lam = 0.0025079          # nm, 200 kV (physics.md section 1 check value)
    K = 1.0 / lam
    g = 5.53                 # nm^-1 (invented, ~ a 200-type reflection of a 0.36 nm fcc cell)
    s_g = 0.02               # nm^-1 (invented)
    phase = 0.3              # origin shift: complex U for a non-centrosymmetric crystal
    orders = np.arange(-3, 4)

    def U(m):
        a = abs(m)
        return 8.0 * np.exp(-0.45 * (a - 1)) * np.exp(1j * phase * m)

    def Up(m):
        a = abs(m) if m != 0 else 1
        return 0.1 * 8.0 * np.exp(-0.45 * (a - 1)) * np.exp(1j * 0.5 * phase * m)

    s = orders * s_g + orders * (1 - orders) * lam * g * g / 2
    n = len(orders)
    A = np.zeros((n, n), dtype=complex)
    Ut = np.zeros((n, n), dtype=complex)
    Upt = np.zeros((n, n), dtype=complex)
    for i in range(n):
        for j in range(n):
            m = int(orders[i] - orders[j])
            Upt[i, j] = Up(m)
            if i == j:
                A[i, j] = s[i] + 1j * Up(0) / (2 * K)
            else:
                Ut[i, j] = U(m)
                A[i, j] = (U(m) + 1j * Up(m)) / (2 * K)
    cases.append(case('row7', A, {
        'inputs': {'excitationErrors_per_nm': s.tolist(), 'potential': cm(Ut), 'absorption': cm(Upt),
                   'waveNumber_per_nm': K, 'lambda_nm': lam, 'g_per_nm': g, 's_g': s_g}}))

    doc = {'generator': 'scripts/ref_manybeam_eigen.py', 'scipy': scipy.__version__, 'numpy': np.__version__,
           'note': 'matrices and potentials are invented test inputs', 'cases': cases}
    with open(OUT, 'w') as f:
        json.dump(doc, f, indent=1)
    print('wrote', os.path.normpath(OUT))


if __name__ == '__main__':
    main()
