#!/usr/bin/env python3
"""Reference column amplitudes for the many-beam integrator.

Writes test/reference/manybeam-columns.json. For each case the many-beam
Howie-Whelan equations (physics.md section 4)

    dphi/dz = 2 pi i (A0 + diag(d(z))) phi,
    A0_gg = s_g + i U'_0/(2K),  A0_gh = (U_{g-h} + i U'_{g-h})/(2K),

are solved here independently of the TypeScript code:
  - perfect crystal: phi(t) = expm(2 pi i A0 t) phi(0) (scipy.linalg.expm);
  - strained columns: scipy.integrate.solve_ivp, method DOP853,
    rtol 1e-12, atol 1e-13, max_step 0.2 nm, directly on phi (no Bloch basis);
  - planar faults: the ODE is stopped at the fault depth and beam j is
    multiplied by exp(+i n_j alpha) (systematic row) or exp(+2 pi i g_j.dR)
    (general beam set), the sign convention of the two-beam engine
    (src/dynamics/twoBeam.ts).
All crystal numbers are INVENTED test inputs (realistic magnitudes for a
200 kV, fcc-like 200 row), not measured data.

Run:  /usr/bin/python3 scripts/ref_manybeam_columns.py
Needs Debian's python3-numpy and python3-scipy.
"""
import json
import os

import numpy as np
import scipy
import scipy.linalg as sl
from scipy.integrate import solve_ivp

OUT = os.path.join(os.path.dirname(__file__), '..', 'test', 'reference', 'manybeam-columns.json')
LAM = 0.0025079   # nm, 200 kV (physics.md section 1)
K = 1.0 / LAM


def cm(a):
    a = np.asarray(a)
    return {'re': a.real.ravel().tolist(), 'im': a.imag.ravel().tolist()}


def interleave(v):
    out = []
    for x in v:
        out += [float(x.real), float(x.imag)]
    return out


def structure(s, Ut, Upt):
    n = len(s)
    A = np.zeros((n, n), dtype=complex)
    for i in range(n):
        for j in range(n):
            if i == j:
                A[i, j] = s[i] + 1j * Upt[i, i] / (2 * K)
            else:
                A[i, j] = (Ut[i, j] + 1j * Upt[i, j]) / (2 * K)
    return A


def row_tables(orders, U, Up):
    n = len(orders)
    Ut = np.zeros((n, n), dtype=complex)
    Upt = np.zeros((n, n), dtype=complex)
    for i in range(n):
        for j in range(n):
            m = int(orders[i] - orders[j])
            Upt[i, j] = Up(m)
            if m != 0:
                Ut[i, j] = U(m)
    return Ut, Upt


def integrate(A0, strain, phi0, t, jumps):
    """strain(z) -> per-beam real vector d(z); jumps: list of (z, phase vector)."""
    def f(z, y):
        return 2j * np.pi * (A0 @ y + strain(z) * y)
    y = np.array(phi0, dtype=complex)
    z0 = 0.0
    for (zj, ph) in list(jumps) + [(t, None)]:
        if zj > z0:
            sol = solve_ivp(f, (z0, zj), y, method='DOP853', rtol=1e-12, atol=1e-13, max_step=0.2)
            assert sol.success, sol.message
            y = sol.y[:, -1]
            z0 = zj
        if ph is not None:
            y = y * ph
    return y


def screw_like(gb, x, zc):
    """beta'(z) of a screw dislocation parallel to the surfaces: (g.b/2pi) x/(x^2+(z-zc)^2)"""
    return lambda z: gb / (2 * np.pi) * x / (x * x + (z - zc) ** 2)


def main():
    cases = []
    g = 5.53  # nm^-1, invented fundamental (a 200-type reflection of a 0.36 nm cell)

    # A: weak beam g(3g), beams -1..3, centrosymmetric (real U)
    orders = np.arange(-1, 4)
    s_g = (3 - 1) * LAM * g * g / 2
    s = orders * s_g + orders * (1 - orders) * LAM * g * g / 2
    U = lambda m: 8.0 * np.exp(-0.45 * (abs(m) - 1))
    Up = lambda m: 0.8 * np.exp(-0.45 * ((abs(m) if m != 0 else 1) - 1))
    Ut, Upt = row_tables(orders, U, Up)
    A0 = structure(s, Ut, Upt)
    phi0 = np.zeros(len(orders), dtype=complex)
    phi0[1] = 1
    perfect = [{'t_nm': t, 'phi': interleave(sl.expm(2j * np.pi * A0 * t) @ phi0)} for t in (37.3, 100.0, 213.0)]
    columns = []
    for x in (0.2, 2.0, 8.0):
        bp = screw_like(2.0, x, 40.0)
        y = integrate(A0, lambda z: orders * bp(z), phi0, 100.0, [])
        columns.append({'t_nm': 100.0, 'strain': {'kind': 'screwLike', 'gb': 2.0, 'x_nm': x, 'zc_nm': 40.0},
                        'faults': [], 'phi': interleave(y)})
    cases.append({'name': 'weakBeam5', 'kind': 'row', 'orders': orders.tolist(), 'incident': 1,
                  'inputs': {'excitationErrors_per_nm': s.tolist(), 'potential': cm(Ut), 'absorption': cm(Upt),
                             'waveNumber_per_nm': K},
                  'perfect': perfect, 'columns': columns})

    # B: 7 beams -3..3, non-centrosymmetric (complex U), two faults and a mild strain
    orders = np.arange(-3, 4)
    s_g = 0.02
    s = orders * s_g + orders * (1 - orders) * LAM * g * g / 2
    U = lambda m: 8.0 * np.exp(-0.45 * (abs(m) - 1)) * np.exp(0.3j * m)
    Up = lambda m: 0.8 * np.exp(-0.45 * ((abs(m) if m != 0 else 1) - 1)) * np.exp(0.15j * m)
    Ut, Upt = row_tables(orders, U, Up)
    A0 = structure(s, Ut, Upt)
    phi0 = np.zeros(len(orders), dtype=complex)
    phi0[3] = 1
    perfect = [{'t_nm': t, 'phi': interleave(sl.expm(2j * np.pi * A0 * t) @ phi0)} for t in (50.0, 150.0)]
    faults = [(31.7, 2 * np.pi / 3), (60.2, -2 * np.pi / 3)]
    bp = screw_like(1.0, 5.0, 45.0)
    y = integrate(A0, lambda z: orders * bp(z), phi0, 90.0, [(z, np.exp(1j * orders * a)) for (z, a) in faults])
    columns = [{'t_nm': 90.0, 'strain': {'kind': 'screwLike', 'gb': 1.0, 'x_nm': 5.0, 'zc_nm': 45.0},
                'faults': [[z, a] for (z, a) in faults], 'phi': interleave(y)}]
    y = integrate(A0, lambda z: 0 * orders, phi0, 90.0, [(z, np.exp(1j * orders * a)) for (z, a) in faults])
    columns.append({'t_nm': 90.0, 'strain': {'kind': 'none'}, 'faults': [[z, a] for (z, a) in faults],
                    'phi': interleave(y)})
    cases.append({'name': 'faulted7', 'kind': 'row', 'orders': orders.tolist(), 'incident': 3,
                  'inputs': {'excitationErrors_per_nm': s.tolist(), 'potential': cm(Ut), 'absorption': cm(Upt),
                             'waveNumber_per_nm': K},
                  'perfect': perfect, 'columns': columns})

    # C: general beam set 000, 200, 020, 220 of a [001] zone (Cartesian g, nm^-1)
    gv = np.array([[0, 0, 0], [g, 0, 0], [0, g, 0], [g, g, 0]])
    s = np.array([0.0, 0.012, 0.031, 0.058])
    r0 = np.array([0.02, 0.05, 0.01])  # origin offset -> complex U

    def Uv(dg):
        m = np.linalg.norm(dg) / g
        return 8.0 * np.exp(-0.45 * (m - 1)) * np.exp(2j * np.pi * dg @ r0)

    def Upv(dg):
        m = max(np.linalg.norm(dg) / g, 1.0)
        return 0.8 * np.exp(-0.45 * (m - 1)) * np.exp(2j * np.pi * dg @ (0.5 * r0))

    n = len(s)
    Ut = np.zeros((n, n), dtype=complex)
    Upt = np.zeros((n, n), dtype=complex)
    for i in range(n):
        for j in range(n):
            dg = gv[i] - gv[j]
            Upt[i, j] = Upv(dg)
            if i != j:
                Ut[i, j] = Uv(dg)
    A0 = structure(s, Ut, Upt)
    phi0 = np.zeros(n, dtype=complex)
    phi0[0] = 1
    perfect = [{'t_nm': t, 'phi': interleave(sl.expm(2j * np.pi * A0 * t) @ phi0)} for t in (40.0, 120.0)]
    bvec = np.array([0.18, 0.10, 0.05])
    xl, zc = 1.5, 35.0
    dRdz = lambda z: bvec / (2 * np.pi) * xl / (xl * xl + (z - zc) ** 2)
    dR = np.array([0.06, 0.03, -0.02])
    y = integrate(A0, lambda z: gv @ dRdz(z), phi0, 80.0, [(50.0, np.exp(2j * np.pi * (gv @ dR)))])
    columns = [{'t_nm': 80.0, 'strain': {'kind': 'vectorLorentzian', 'b_nm': bvec.tolist(), 'x_nm': xl, 'zc_nm': zc},
                'faults': [[50.0] + dR.tolist()], 'phi': interleave(y)}]
    cases.append({'name': 'general4', 'kind': 'general', 'beamVectors_per_nm': gv.ravel().tolist(), 'incident': 0,
                  'inputs': {'excitationErrors_per_nm': s.tolist(), 'potential': cm(Ut), 'absorption': cm(Upt),
                             'waveNumber_per_nm': K},
                  'perfect': perfect, 'columns': columns})

    doc = {'generator': 'scripts/ref_manybeam_columns.py', 'scipy': scipy.__version__, 'numpy': np.__version__,
           'method': 'expm for perfect crystals; solve_ivp DOP853 rtol 1e-12 atol 1e-13 max_step 0.2 nm for columns',
           'note': 'all crystal numbers are invented test inputs', 'cases': cases}
    with open(OUT, 'w') as f:
        json.dump(doc, f, indent=1)
    print('wrote', os.path.normpath(OUT))


if __name__ == '__main__':
    main()
