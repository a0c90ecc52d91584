#!/usr/bin/python3
"""Independent reference for the thermal-diffuse-scattering (TDS) absorptive
form factors, Einstein model (Hall & Hirsch 1965, Proc. R. Soc. A286, 158;
Bird & King 1990, Acta Cryst. A46, 202; Weickenmeier & Kohl 1991, Acta
Cryst. A47, 590):

    f'(g) = 2 (h / m0 v) * I(g),   h / m0 v = gamma * lambda (Angstrom)

    I(g) = int d^2s'  fe(|s'|) fe(|S - s'|)
                      [exp(-B S^2) - exp(-B (s'^2 + |S - s'|^2))]

S = g / 2 (the vector with |S| = s = sin(theta)/lambda), the integral over the
plane perpendicular to the beam, fe the electron scattering factor of the
neutral atom (Angstrom), B the Debye-Waller factor (Angstrom^2, DW amplitude
factor exp(-B s^2)). The project (src/scattering/absorption.ts) evaluates I
in closed form from the Gaussian fit; here it is integrated NUMERICALLY in
polar coordinates (scipy.integrate.dblquad) with the coefficients read from
Debian's python3-gemmi (gemmi.Element(X).c4322: International Tables Vol. C
Table 4.3.2.2, fits of Peng, Ren, Dudarev & Whelan 1996), so the data file
of the project is not used either.

Also writes, for a few crystals of the project's library (lattice parameter
and B as in data/materials.json, the atom positions of the structure type
written out here), the complex ratio U'_g / U_g (independent of the origin),
|U_g| and U'_0 (nm^-2) at 100 and 200 kV, with

    U_g  = gamma F_g / (pi Vc),   F_g  = sum_j fe_j(s) exp(-B_j s^2) exp(2 pi i g.r_j)
    U'_g = gamma F'_g / (pi Vc),  F'_g = sum_j f'_j(g)            exp(2 pi i g.r_j)

gamma and lambda from CODATA 2018 (h, c, e exact; m_e recommended).

Run from the repo root:  /usr/bin/python3 scripts/ref_absorptive_form_factor.py
Writes test/reference/absorptive-form-factors.json. Takes about a minute.
"""
import json
import math
import os

import gemmi
import numpy as np
import scipy
from scipy.integrate import dblquad

H = 6.62607015e-34
C = 299792458.0
E = 1.602176634e-19
ME = 9.1093837015e-31


def gamma_lambda_A(kV):
    eE = E * kV * 1e3
    m0c2 = ME * C * C
    gamma = 1 + eE / m0c2
    p = math.sqrt(2 * ME * eE * (1 + eE / (2 * m0c2)))
    return gamma, H / p * 1e10


def fe_factory(symbol):
    c = gemmi.Element(symbol).c4322
    a = np.array(list(c.a), dtype=float)
    b = np.array(list(c.b), dtype=float)

    def fe(s2):
        return float(np.sum(a * np.exp(-b * s2)))

    return fe, float(np.min(b))


def tds_integral(symbol, B, s):
    """I(s) by numerical quadrature in polar coordinates (r, phi) about s' = 0, S = (s, 0)."""
    fe, bmin = fe_factory(symbol)
    # fe(r)^2 < 1e-30 fe(0)^2 beyond r_max: the integrand is negligible there
    r_max = math.sqrt(35.0 / bmin) + 2 * s
    S2 = s * s

    def integrand(phi, r):
        d2 = S2 + r * r - 2 * s * r * math.cos(phi)
        return r * fe(r * r) * fe(d2) * (math.exp(-B * S2) - math.exp(-B * (r * r + d2)))

    # symmetric in phi -> 2 * int_0^pi
    val, err = dblquad(integrand, 0.0, r_max, 0.0, math.pi, epsabs=0.0, epsrel=1e-10)
    return 2 * val, 2 * err


def tail_fraction(symbol, B, s_cut=2.0):
    """Part of I(0) that comes from |s'| > s_cut (beyond the fitted range of the table)."""
    fe, bmin = fe_factory(symbol)
    r_max = math.sqrt(35.0 / bmin)

    def radial(r):
        return 2 * math.pi * r * fe(r * r) ** 2 * (1 - math.exp(-2 * B * r * r))

    from scipy.integrate import quad
    total = quad(radial, 0, r_max, epsabs=0, epsrel=1e-12, limit=400)[0]
    tail = quad(radial, s_cut, r_max, epsabs=0, epsrel=1e-12, limit=400)[0]
    # the same tail if fe followed the Mott-Bethe asymptote 0.023934 Z / s^2 beyond s_cut
    # (an upper bound: the X-ray factor fx, still a few electrons at 2 per A, is left out)
    Z = gemmi.Element(symbol).atomic_number

    def radial_mb(r):
        return 2 * math.pi * r * (0.023934 * Z / (r * r)) ** 2 * (1 - math.exp(-2 * B * r * r))

    tail_mb = quad(radial_mb, s_cut, np.inf, epsabs=0, epsrel=1e-10, limit=400)[0]
    return tail / total, (tail_mb - tail) / total


def tail_extended_ratio(symbol, B, s):
    """I(s) with fe continued beyond 2 per A as C / s^2 (C = 4 fe(2), continuous at 2: a lower bound
    on the true Mott-Bethe tail 0.023934 (Z - fx) / s^2), divided by I(s) of the fit, minus 1."""
    fe, _ = fe_factory(symbol)
    C = fe(4.0) * 4.0

    def f(s2):
        return fe(s2) if s2 <= 4.0 else C / s2

    S2 = s * s

    def integrand(phi, r):
        d2 = S2 + r * r - 2 * s * r * math.cos(phi)
        return r * f(r * r) * f(d2) * (math.exp(-B * S2) - math.exp(-B * (r * r + d2)))

    v = 2 * dblquad(integrand, 0.0, 80.0, 0.0, math.pi, epsabs=1e-10, epsrel=1e-7)[0]
    return v / tds_integral(symbol, B, s)[0] - 1


FCC = [(0, 0, 0), (0, 0.5, 0.5), (0.5, 0, 0.5), (0.5, 0.5, 0)]


def shifted(ps, d):
    return [tuple((p[i] + d[i]) % 1.0 for i in range(3)) for p in ps]


def crystal(name):
    mats = {m["name"]: m for m in json.load(open(os.path.join(ROOT, "data", "materials.json")))["materials"]}
    m = mats[name]
    a = m["lattice"]["a_nm"]
    B = m["debyeWaller_A2"]
    st = m["structure"]
    el = m["elements"]
    if st == "fcc":
        sites = [(el[0], p) for p in FCC]
    elif st == "bcc":
        sites = [(el[0], p) for p in [(0, 0, 0), (0.5, 0.5, 0.5)]]
    elif st == "diamond":
        sites = [(el[0], p) for p in FCC + shifted(FCC, (0.25, 0.25, 0.25))]
    elif st == "zincblende":
        sites = [(el[0], p) for p in FCC] + [(el[1], p) for p in shifted(FCC, (0.25, 0.25, 0.25))]
    else:
        raise SystemExit(f"structure {st} not written out here")
    return a, [(e, p, B[e]) for e, p in sites]


def potentials(name, hkl, kV, cache):
    a_nm, sites = crystal(name)
    gamma, lam = gamma_lambda_A(kV)
    Vc = a_nm ** 3
    g_A = math.sqrt(sum(h * h for h in hkl)) / (10 * a_nm)  # |g| in 1/Angstrom
    s = g_A / 2
    F = 0j
    Fp = 0j
    for el, p, B in sites:
        fe, _ = fe_factory(el)
        key = (el, B, round(s, 12))
        if key not in cache:
            cache[key] = tds_integral(el, B, s)[0]
        fprime = 2 * gamma * lam * cache[key]
        ph = np.exp(2j * math.pi * (hkl[0] * p[0] + hkl[1] * p[1] + hkl[2] * p[2]))
        F += fe(s * s) * math.exp(-B * s * s) * ph
        Fp += fprime * ph
    k = gamma / (math.pi * Vc * 10)  # F in Angstrom -> nm
    return k * F, k * Fp


ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def main():
    integrals = []
    for symbol, B in [("Al", 0.8), ("Cu", 0.55), ("Si", 0.46), ("Au", 0.6), ("Fe", 0.35), ("Ga", 0.66), ("As", 0.59), ("O", 0.34), ("Cu", 1.5), ("Cu", 0.05)]:
        for s in [0.0, 0.1, 0.25, 0.5, 1.0, 2.0, 3.0]:
            val, err = tds_integral(symbol, B, s)
            integrals.append({"element": symbol, "B_A2": B, "s_perA": s, "I": val, "quadratureError": err})
    tails = [dict(zip(("element", "B_A2", "fractionBeyond2", "missingIfMottBetheTailUpperBound"), (e, B, *tail_fraction(e, B)))) for e, B in [("Al", 0.8), ("Cu", 0.55), ("Si", 0.46), ("Au", 0.6)]]
    tail_ext = [{"element": e, "B_A2": B, "s_perA": x, "increase": tail_extended_ratio(e, B, x)}
                for e, B in [("Al", 0.8), ("Cu", 0.55), ("Si", 0.46), ("Au", 0.6)] for x in (0.0, 0.2, 0.4, 0.7, 1.0)]
    cache = {}
    crystals = []
    for name, refl in [("Cu", [(1, 1, 1), (2, 0, 0), (2, 2, 0), (3, 1, 1), (4, 0, 0)]),
                       ("Al", [(1, 1, 1), (2, 0, 0), (2, 2, 0)]),
                       ("Si", [(1, 1, 1), (2, 2, 0), (4, 0, 0)]),
                       ("alpha-Fe", [(1, 1, 0), (2, 0, 0)]),
                       ("GaAs", [(1, 1, 1), (2, 0, 0), (2, 2, 0)])]:
        for kV in (100, 200):
            _, U0p = potentials(name, (0, 0, 0), kV, cache)
            rows = []
            for hkl in refl:
                U, Up = potentials(name, hkl, kV, cache)
                r = Up / U
                rows.append({"hkl": list(hkl), "absU_per_nm2": abs(U), "ratioRe": r.real, "ratioIm": r.imag})
            crystals.append({"material": name, "kV": kV, "U0abs_per_nm2": U0p.real, "reflections": rows})
    out = {
        "about": "TDS absorptive form factors, Einstein model (Hall & Hirsch 1965; Bird & King 1990; Weickenmeier & Kohl 1991): "
                 "I(s) = int d^2s' fe(s') fe(|S-s'|) [exp(-B S^2) - exp(-B (s'^2 + |S-s'|^2))] (dimensionless), f' = 2 gamma lambda I (Angstrom); "
                 "numerical 2D quadrature (scipy.integrate.dblquad, epsrel 1e-10) with Peng et al. 1996 coefficients from gemmi c4322",
        "generator": "scripts/ref_absorptive_form_factor.py",
        "gemmi": gemmi.__version__,
        "scipy": scipy.__version__,
        "integrals": integrals,
        "tailBeyondFittedRange": tails,
        "increaseWithInverseSquareTail": tail_ext,
        "crystals": crystals,
    }
    path = os.path.join(ROOT, "test", "reference", "absorptive-form-factors.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    print(f"wrote {path}")


if __name__ == "__main__":
    main()
