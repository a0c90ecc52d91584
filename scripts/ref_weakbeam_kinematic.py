#!/usr/bin/python3
"""Reference for the weak-beam image position of a screw dislocation parallel
to the foil surfaces, from the kinematical integral (Hirsch et al. 1965,
ch. 11; the stationary-phase argument of Cockayne, Ray & Whelan 1969):

    phi_g(x) ~ x * int exp(i g.b (kappa u - atan u)) du,   kappa = 2 pi s x / (g.b)

(infinite foil, the perfect-crystal part removed). The dark-field intensity
x^2 |F|^2 peaks at kappa_peak(g.b): the rule of thumb |x| = g.b/(2 pi s) is
kappa = 1, the depth where s + beta' = 0 just touches the dislocation.
Integrals by scipy.integrate.quad (Debian python3-scipy). Writes
test/reference/weakbeam-kinematic.json.
"""
import json
import os
import numpy as np
from scipy.integrate import quad
import scipy


def kappa_peak(gb):
    eps = 1e-3
    best = None
    for k in np.linspace(0.1, 1.6, 301):
        def h(u, part):
            a = np.exp(1j * gb * (k * u - np.arctan(u))) - np.exp(1j * gb * (k * u - np.pi / 2 * np.sign(u)))
            return (a.real if part == 0 else a.imag) * np.exp(-eps * abs(u))
        re = quad(h, -2000, 2000, args=(0,), limit=4000)[0]
        im = quad(h, -2000, 2000, args=(1,), limit=4000)[0]
        inten = k * k * (re * re + im * im)
        if best is None or inten > best[0]:
            best = (inten, k)
    return float(best[1])


out = {
    "about": "kappa_peak = 2 pi s x_peak / (g.b): weak-beam dark-field peak of a screw dislocation, kinematical integral (scipy.integrate.quad)",
    "generator": "scripts/ref_weakbeam_kinematic.py",
    "scipy": scipy.__version__,
    "kappaPeak": {str(gb): kappa_peak(gb) for gb in (1, 2)},
}
path = os.path.join(os.path.dirname(__file__), "..", "test", "reference", "weakbeam-kinematic.json")
with open(path, "w") as f:
    json.dump(out, f, indent=2)
    f.write("\n")
print(json.dumps(out))
