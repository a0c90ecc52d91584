#!/usr/bin/python3
"""Which systematic row a weak-beam image g(ng) needs: numpy eigen-solutions
of the perfect crystal, written independently of the TypeScript code.

For Cu (fcc, a = 0.36149 nm, Debye-Waller B = 0.55 A^2: the project's Cu
entry in data/materials.json), 200 kV, reflections 200 and 220 (and 111 in
the study), absorption ratio 0.1, this script builds the systematic-row
structure matrix of physics.md section 4,

    A_nn = s_n + i U'_0 / (2K),   A_nm = (U_(n-m)g + i U'_(n-m)g) / (2K),
    s_n  = n s_g + n (1 - n) lambda g^2 / 2,   s_g = (N - 1) lambda g^2 / 2  (g(Ng)),
    U_mg = gamma F_mg / (pi Vc),  F = 4 fe(s) exp(-B s^2)  (fcc, mg all even/odd),
    U'_mg = 0.1 U_mg,  U'_0 = K / xi'_0 with xi'_0 = xi'_g = 10 / (lambda U_g),

with fe from International Tables Vol. C Table 4.3.2.2 as exported by
gemmi (Element.c4322), the CODATA 2018 wavelength, and solves
phi(t) = C exp(2 pi i Gamma t) C^-1 phi(0) with numpy.linalg.eig.

Study (printed with --study): the dark-field intensity |phi_g(t)|^2 for rows
nMin..nMax against a wide row -8..(N+8) (converged), for N = 2..5 and
t = 30..150 nm. The row the renderer picks for "beams": "row",
-N g .. (N+2) g, is within about 1 % of the wide row in every case printed
except where the intensity itself is below 1e-4 of the incident beam (111
g(3g) at 150 nm: 9e-5, off by 10 %); -(N-1)..(N+1) is off by up to 6 %; the
symmetric -2..2 row of the old demo (which lacks 3g) is off by tens of percent
(Cu 200 g(3g), 60 nm: +48 %; Cu 220: +7 %).

Writes test/reference/weakbeam-rows.json: Cu 220 and 200 g(3g), t = 60 nm,
intensities of 000 and g for the rows -2..2 (old demo), -3..5 (the default)
and -8..11 (wide).

Run:  /usr/bin/python3 scripts/ref_weakbeam_rows.py [--study]
Needs Debian's python3-numpy and python3-gemmi.
"""
import json
import math
import os
import sys

import gemmi
import numpy as np

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'weakbeam-rows.json')

# CODATA 2018
H = 6.62607015e-34
M0 = 9.1093837015e-31
E = 1.602176634e-19
C = 299792458.0

A_NM = 0.36149
B_A2 = 0.55
KV = 200.0
R = 0.1


def wavelength_nm(kv):
    ev = E * kv * 1e3
    return H / math.sqrt(2 * M0 * ev * (1 + ev / (2 * M0 * C * C))) * 1e9


LAM = wavelength_nm(KV)
GAMMA = 1 + E * KV * 1e3 / (M0 * C * C)
K = 1 / LAM
VC = A_NM ** 3
CU = gemmi.Element('Cu').c4322


def fe_A(s_inv_A):
    return sum(a * math.exp(-b * s_inv_A ** 2) for a, b in zip(CU.a, CU.b))


def U(hkl):
    """U_g in nm^-2 (real: fcc with an atom at the origin is centrosymmetric)."""
    if all(h == 0 for h in hkl):
        g = 0.0
    else:
        g = math.sqrt(sum(h * h for h in hkl)) / A_NM  # nm^-1
    parity = {h % 2 for h in hkl}
    if len(parity) != 1:
        return 0.0
    s = g / 20.0  # sin(theta)/lambda in A^-1 = |g|/2, nm^-1 -> A^-1
    F_nm = 4 * fe_A(s) * math.exp(-B_A2 * s * s) / 10.0
    return GAMMA * F_nm / (math.pi * VC)


def intensities(hkl, N, t, nmin, nmax):
    g = math.sqrt(sum(h * h for h in hkl)) / A_NM
    Ug = U(hkl)
    xi = 1 / (LAM * Ug)
    U0abs = K / (10 * xi)
    sg = (N - 1) * LAM * g * g / 2
    orders = list(range(nmin, nmax + 1))
    n = len(orders)
    A = np.zeros((n, n), dtype=complex)
    for i, p in enumerate(orders):
        for j, q in enumerate(orders):
            if i == j:
                A[i, i] = p * sg + p * (1 - p) * LAM * g * g / 2 + 1j * U0abs / (2 * K)
            else:
                u = U([(p - q) * h for h in hkl])
                A[i, j] = (u + 1j * R * u) / (2 * K)
    w, Cm = np.linalg.eig(A)
    phi0 = np.zeros(n, dtype=complex)
    phi0[orders.index(0)] = 1
    alpha = np.linalg.solve(Cm, phi0)
    phi = Cm @ (np.exp(2j * math.pi * w * t) * alpha)
    return abs(phi[orders.index(0)]) ** 2, abs(phi[orders.index(1)]) ** 2


def study():
    print('dark-field |phi_g|^2 relative to the wide row -8..N+8 (Cu, 200 kV)')
    for hkl in ([1, 1, 1], [2, 0, 0], [2, 2, 0]):
        for N in (2, 3, 4, 5):
            for t in (30, 60, 90, 150):
                wide = intensities(hkl, N, t, -8, N + 8)[1]
                cells = []
                for lo, hi in ((-2, 2), (-(N - 1), N + 1), (-(N - 1), N + 2), (-N, N + 2), (-(N + 1), N + 3)):
                    v = intensities(hkl, N, t, lo, hi)[1]
                    cells.append(f'{lo}..{hi}: {v / wide - 1:+.4f}')
                print(hkl, f'g({N}g)', f't={t}', f'wide={wide:.3e}', ' | '.join(cells))


def main():
    if '--study' in sys.argv:
        study()
        return
    cases = []
    t = 60.0
    N = 3
    for hkl in ([2, 2, 0], [2, 0, 0]):
        rows = {}
        for lo, hi in ((-2, 2), (-3, 5), (-8, 11)):
            i0, ig = intensities(hkl, N, t, lo, hi)
            rows[f'{lo}..{hi}'] = {'nMin': lo, 'nMax': hi, 'bf': i0, 'df': ig}
        g = math.sqrt(sum(h * h for h in hkl)) / A_NM
        cases.append({'g': hkl, 'weakBeam': N, 'thickness_nm': t, 'xi_nm': 1 / (LAM * U(hkl)),
                      's_per_nm': (N - 1) * LAM * g * g / 2, 'rows': rows})
    out = {
        'source': 'scripts/ref_weakbeam_rows.py: numpy.linalg.eig of the systematic-row matrix (physics.md section 4); '
                  'fe from ITC Vol. C Table 4.3.2.2 via gemmi ' + gemmi.__version__ + ', numpy ' + np.__version__,
        'material': 'Cu', 'a_nm': A_NM, 'debyeWaller_A2': B_A2, 'kV': KV, 'absorption': R, 'lambda_nm': LAM,
        'cases': cases,
    }
    with open(OUT, 'w') as f:
        json.dump(out, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
