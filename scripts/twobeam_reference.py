#!/usr/bin/python3
"""Reference exit amplitudes of the two-beam Howie-Whelan equations
(beta form, physics.md section 3) from a general-purpose ODE solver:
scipy.integrate.solve_ivp, method DOP853 (Hairer, Norsett & Wanner),
rtol = atol = 1e-12.

    dphi0/dz = -(pi/xi'0) phi0 + pi i q phig
    dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta'(z))] phig
    q = 1/xi_g + i/xi'_g,  phi0(0) = 1, phig(0) = 0

beta'(z) is a sum of Lorentzians A / (1 + ((z - z0)/w)^2), the depth profile
of the strain of a dislocation passing a column at distance w (A = g.b/(2 pi w)).
The integration is split at every z0 so that the solver cannot step over a
narrow peak. Cases: perfect crystals with absorption, single Lorentzians,
a dipole, a narrow peak, and 60 random sums of 1-3 Lorentzians (fixed seed).
Used by test/dynamics/twoBeamPerfect.test.ts and twoBeamAdaptive.test.ts.

Usage:
  /usr/bin/python3 scripts/twobeam_reference.py            # writes test/reference/twobeam-scipy.json
  /usr/bin/python3 scripts/twobeam_reference.py --stdin    # cases JSON on stdin, results JSON on stdout
"""
import json
import math
import os
import sys

import numpy as np
import scipy
from scipy.integrate import solve_ivp

INF = float("inf")


def beta_prime(z, lorentz):
    v = 0.0
    for L in lorentz:
        u = (z - L["z0"]) / L["w"]
        v += L["A"] / (1.0 + u * u)
    return v


def column(case):
    xi = case["xi_nm"]
    xia = case["xiAbs_nm"]
    xia0 = case["xiAbs0_nm"]
    s = case["s_per_nm"]
    t = case["t_nm"]
    lorentz = case.get("lorentz", [])
    q = 1.0 / xi + 1j / xia
    d0 = -math.pi / xia0
    piq = math.pi * 1j * q

    def rhs(z, y):
        se = s + beta_prime(z, lorentz)
        return np.array([d0 * y[0] + piq * y[1],
                         piq * y[0] + (d0 + 2j * math.pi * se) * y[1]])

    cuts = sorted({0.0, t} | {L["z0"] for L in lorentz if 0.0 < L["z0"] < t})
    y = np.array([1.0 + 0j, 0j])
    for a, b in zip(cuts[:-1], cuts[1:]):
        sol = solve_ivp(rhs, (a, b), y, method="DOP853", rtol=1e-12, atol=1e-12)
        if not sol.success:
            raise RuntimeError(sol.message)
        y = sol.y[:, -1]
    return [y[0].real, y[0].imag, y[1].real, y[1].imag]


def encode(x):
    return "Infinity" if x == INF else x


def decode(case):
    out = dict(case)
    for k in ("xiAbs_nm", "xiAbs0_nm"):
        if out[k] == "Infinity":
            out[k] = INF
    return out


def default_cases():
    cases = []
    # perfect crystal with absorption (xi'_g = 10 xi_g, common practice,
    # Hirsch et al. 1965), several s and t
    for s in (-0.03, -0.01, 0.0, 0.01, 0.05):
        for t in (37.0, 100.0, 250.0):
            cases.append(dict(name=f"perfect s={s} t={t}", xi_nm=30.0, xiAbs_nm=300.0,
                              xiAbs0_nm=300.0, s_per_nm=s, t_nm=t))
    # normal absorption different from anomalous absorption
    cases.append(dict(name="perfect xi'0 != xi'g", xi_nm=42.0, xiAbs_nm=420.0,
                      xiAbs0_nm=250.0, s_per_nm=0.015, t_nm=180.0))
    # dislocation-like strain profiles (Lorentzian beta')
    gb = [1.0, 2.0, -1.0]
    for i, (x0, z0, s) in enumerate([(2.0, 50.0, 0.0), (2.0, 37.0, 0.01), (5.0, 20.0, -0.01),
                                      (0.5, 63.0, 0.0), (1.0, 81.0, 0.02), (10.0, 45.0, 0.0)]):
        A = gb[i % 3] / (2 * math.pi * x0)
        cases.append(dict(name=f"lorentz x0={x0} z0={z0} s={s} gb={gb[i % 3]}", xi_nm=30.0,
                          xiAbs_nm=300.0, xiAbs0_nm=300.0, s_per_nm=s, t_nm=100.0,
                          lorentz=[dict(A=A, w=x0, z0=z0)]))
    # a dipole: two dislocations of opposite sign in one column
    cases.append(dict(name="dipole", xi_nm=30.0, xiAbs_nm=300.0, xiAbs0_nm=300.0,
                      s_per_nm=0.005, t_nm=120.0,
                      lorentz=[dict(A=1 / (2 * math.pi * 3.0), w=3.0, z0=40.0),
                               dict(A=-1 / (2 * math.pi * 3.0), w=3.0, z0=75.0)]))
    # no absorption with strain
    cases.append(dict(name="lorentz no absorption", xi_nm=30.0, xiAbs_nm=INF, xiAbs0_nm=INF,
                      s_per_nm=0.0, t_nm=100.0,
                      lorentz=[dict(A=1 / (2 * math.pi * 2.0), w=2.0, z0=50.0)]))
    # near the core: rho = 0.05 nm
    cases.append(dict(name="narrow peak rho=0.05", xi_nm=30.0, xiAbs_nm=300.0, xiAbs0_nm=300.0,
                      s_per_nm=0.0, t_nm=100.0,
                      lorentz=[dict(A=1 / (2 * math.pi * 0.05), w=0.05, z0=41.3)]))
    # random sums of 1-3 Lorentzian peaks (fixed seed), for the adaptive slicing
    rng = np.random.default_rng(20240611)
    gbs = [1.0, -1.0, 2.0, -2.0, 1 / 3, -1 / 3, 2 / 3, -2 / 3, 3.0]
    for i in range(60):
        t = float(20 + 280 * rng.random())
        xi = float(20 + 80 * rng.random())
        xia = INF if rng.random() < 0.2 else float(xi / (0.05 + 0.1 * rng.random()))
        lorentz = []
        for _ in range(int(rng.integers(1, 4))):
            w = float(math.exp(math.log(0.02) + rng.random() * math.log(1000.0)))
            gb = gbs[int(rng.integers(0, len(gbs)))]
            lorentz.append(dict(A=gb / (2 * math.pi * w), w=w, z0=float(-20 + (t + 40) * rng.random())))
        cases.append(dict(name=f"random {i}", xi_nm=xi, xiAbs_nm=xia, xiAbs0_nm=xia,
                          s_per_nm=float(0.1 * (rng.random() - 0.5)), t_nm=t, lorentz=lorentz))
    return cases


def main():
    if "--stdin" in sys.argv:
        cases = [decode(c) for c in json.load(sys.stdin)]
        json.dump([column(c) for c in cases], sys.stdout)
        return
    cases = default_cases()
    result = dict(
        source=("scipy.integrate.solve_ivp DOP853 rtol=1e-12 atol=1e-12, scipy "
                + scipy.__version__ + "; generated by scripts/twobeam_reference.py"),
        cases=[dict({k: (encode(v) if k in ("xiAbs_nm", "xiAbs0_nm") else v)
                     for k, v in c.items()}, amplitudes=column(c)) for c in cases],
    )
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    path = os.path.join(root, "test", "reference", "twobeam-scipy.json")
    tmp = path + ".tmp"
    with open(tmp, "w") as fh:
        json.dump(result, fh, indent=1)
        fh.write("\n")
    os.replace(tmp, path)
    print(f"wrote {len(cases)} cases to {path}")


if __name__ == "__main__":
    main()
