#!/usr/bin/python3
"""
Second independent reference for trace analysis (thinfoil `traces`), for any
lattice: random synthetic trace measurements with a known line direction u,
and u solved back from them by another route than src/analysis/traces.ts.

Independent of thinfoil (imports nothing from it, shares no code):
  * Lattice -> Cartesian: gemmi.UnitCell (Debian python3-gemmi) from the six
    cell parameters; a direction [uvw] is orth @ [uvw], a plane normal (hkl) is
    inv(orth)^T @ (hkl). Cubic, tetragonal, orthorhombic, hexagonal and
    rhombohedral cells are drawn.
  * Screen frame of a view (angles counter-clockwise from +x with +y down, as
    the micrograph is displayed; ez along the beam into the foil, ey = ez x ex):
    the image +x axis is g's in-plane direction turned by +gAngle about ez
    (scipy.spatial.transform.Rotation.from_rotvec), since a direction at screen
    angle a is (cos a, -sin a) on (ex, ey), i.e. ex turned by -a about ez.
  * Forward model: the trace of u on a view is atan2(-(u.ey), u.ex), mod 180.
  * Solver: (1) the classical construction (Edington 1975; Williams & Carter
    2009): each trace and its beam span a plane that contains u, normal
    n_i = B_i x t_i; u is the right singular vector of the stacked n_i / sigma_i
    with the smallest singular value (numpy SVD; exact for two views). (2) The
    weighted least squares on the trace angles, wrap(measured - predicted) /
    sigma_i, by scipy.optimize.least_squares (trust region, finite-difference
    Jacobian) on a two-parameter tangent-plane chart of the sphere; covariance
    (J^T J)^-1 on the tangent plane at the solution (J by 3-point differences),
    its eigenvalues give the one-sigma axes.
  * Projected length of a line crossing the foil: the two points where the
    line meets the surfaces r.N = 0 and r.N = t, projected on the screen
    (x, y) of that view; the inclination to the surface asin|u.N|, and its
    one-sigma error by Monte Carlo: 20000 directions drawn from the fitted
    covariance on the tangent plane (numpy Generator, seeded).

Usage:
  /usr/bin/python3 scripts/ref_trace_planes.py < request.json
  request: {"seed": 5, "cases": 40, "noise": true}
  reply:   {"cases": [{"system", "cell": [a, b, c, alpha, beta, gamma] (nm, degrees),
             "metric": G (3x3, nm^2), "truth": u [uvw], "normal": [uvw], "thickness_nm",
             "views": [{"beam", "g", "gAngle", "lineAngle", "error"}],
             "length": {"view": 0, "length_nm", "lengthError_nm"},
             "ref": {"u": [uvw], "uPlanes": [uvw], "sigmaMajor_deg", "sigmaMinor_deg", "cone_deg",
                     "chi2", "inclination_deg", "inclinationErrorMC_deg", "impliedThickness_nm",
                     "lengthPerThickness"}}, ...]}
  Directions are lattice components (any scale); compare them with the metric G.
"""
import itertools
import json
import math
import sys

import gemmi
import numpy as np
from scipy.optimize import least_squares
from scipy.spatial.transform import Rotation


# ---------------------------------------------------------------- lattice
def cell_of(system, rng):
    """Six cell parameters (nm, degrees) of a random cell of the crystal system."""
    a = float(rng.uniform(0.25, 0.6))
    if system == 'cubic':
        return [a, a, a, 90.0, 90.0, 90.0]
    if system == 'tetragonal':
        return [a, a, a * float(rng.uniform(0.6, 1.6)), 90.0, 90.0, 90.0]
    if system == 'orthorhombic':
        return [a, a * float(rng.uniform(0.7, 1.4)), a * float(rng.uniform(0.6, 1.6)), 90.0, 90.0, 90.0]
    if system == 'hexagonal':
        return [a, a, a * float(rng.uniform(1.4, 1.8)), 90.0, 90.0, 120.0]
    if system == 'rhombohedral':
        al = float(rng.uniform(55, 85))
        return [a, a, a, al, al, al]
    raise ValueError(system)


class Frame:
    """Cartesian images of lattice directions and plane normals (gemmi's orthogonalisation)."""

    def __init__(self, cell):
        uc = gemmi.UnitCell(*[c * 10 for c in cell[:3]], *cell[3:])  # gemmi works in Angstrom
        self.A = np.array(uc.orth.mat.tolist()) / 10.0  # columns a, b, c in nm
        self.Ainv = np.linalg.inv(self.A)

    def direction(self, uvw):
        return self.A @ np.asarray(uvw, float)

    def plane(self, hkl):
        return self.Ainv.T @ np.asarray(hkl, float)

    def to_lattice(self, v):
        return self.Ainv @ v

    def metric(self):
        return self.A.T @ self.A


def unit(v):
    v = np.asarray(v, float)
    return v / np.linalg.norm(v)


def wrap180(d):
    """Degrees into [-90, 90): traces have no sense."""
    return (d + 90.0) % 180.0 - 90.0


# ---------------------------------------------------------------- one view
def screen_axes(fr, beam, g, g_angle_deg):
    """ex, ey, ez (Cartesian) of the micrograph: ez along the beam, g drawn at g_angle_deg."""
    ez = unit(fr.direction(beam))
    gc = fr.plane(g)
    gh = unit(gc - ez * (gc @ ez))
    ex = Rotation.from_rotvec(math.radians(g_angle_deg) * ez).apply(gh)
    ey = np.cross(ez, ex)
    return ex, ey, ez


def screen_angle(u, axes):
    ex, ey, _ = axes
    return math.degrees(math.atan2(-(u @ ey), u @ ex))


# ---------------------------------------------------------------- the solver
def solve(fr, views):
    axes = [screen_axes(fr, v['beam'], v['g'], v['gAngle']) for v in views]
    meas = np.array([v['lineAngle'] for v in views], float)
    sig = np.array([v['error'] for v in views], float)
    # (1) planes through each beam and its trace
    normals = []
    for (ex, ey, ez), m, s in zip(axes, meas, sig):
        t = math.cos(math.radians(m)) * ex - math.sin(math.radians(m)) * ey
        normals.append(unit(np.cross(ez, t)) / s)
    _, _, vt = np.linalg.svd(np.array(normals))
    u_planes = vt[-1]

    def chart(u0):
        e1 = unit(np.cross(u0, [1.0, 0, 0] if abs(u0[0]) < 0.6 else [0, 1.0, 0]))
        e2 = np.cross(u0, e1)
        return e1, e2

    def residuals_at(u0):
        e1, e2 = chart(u0)

        def f(p):
            u = unit(u0 + p[0] * e1 + p[1] * e2)
            return np.array([wrap180(m - screen_angle(u, ax)) for m, ax in zip(meas, axes)]) / sig

        return f, e1, e2

    # (2) least squares on the angles (degrees / sigma), from the plane estimate
    f, e1, e2 = residuals_at(u_planes)
    r = least_squares(f, [0.0, 0.0], method='trf', xtol=1e-15, ftol=1e-15, gtol=1e-15, x_scale=1e-2)
    u = unit(u_planes + r.x[0] * e1 + r.x[1] * e2)
    # Jacobian on a chart centred at the solution: p in radians of arc (to first order)
    f, e1, e2 = residuals_at(u)
    h = 1e-6
    J = np.empty((len(views), 2))
    for k in range(2):
        dp = np.zeros(2)
        dp[k] = h
        J[:, k] = (f(dp) - f(-dp)) / (2 * h)
    # residuals are (degrees / sigma in degrees), dimensionless; p is in radians: covariance of p in radians^2
    C = np.linalg.inv(J.T @ J)
    C_deg2 = C * (180.0 / math.pi) ** 2
    ev = np.sort(np.linalg.eigvalsh(C_deg2))[::-1]
    chi2 = float(np.sum(f(np.zeros(2)) ** 2))
    if u @ (math.cos(math.radians(meas[0])) * axes[0][0] - math.sin(math.radians(meas[0])) * axes[0][1]) < 0:
        u = -u
    return {'u': u, 'u_planes': u_planes, 'C': C, 'e': (e1, e2), 'sigma': (math.sqrt(ev[0]), math.sqrt(max(ev[1], 0.0))), 'chi2': chi2}


def crossing_length(fr, u, beam, normal, t, axes):
    """Projected length of the segment between r.N = 0 and r.N = t along u, on the screen of that view."""
    N = unit(fr.direction(normal))
    p0 = np.zeros(3)
    p1 = u * (t / (u @ N))
    ex, ey, _ = axes
    d = np.array([(p1 - p0) @ ex, (p1 - p0) @ ey])
    return float(np.hypot(*d))


# ---------------------------------------------------------------- random cases
def small_indices(n):
    out = []
    for v in itertools.product(range(-n, n + 1), repeat=3):
        if v == (0, 0, 0) or math.gcd(math.gcd(abs(v[0]), abs(v[1])), abs(v[2])) != 1:
            continue
        out.append(list(v))
    return out


IDX3 = small_indices(3)


def make_case(rng, system, noise):
    cell = cell_of(system, rng)
    fr = Frame(cell)
    normal = IDX3[int(rng.integers(len(IDX3)))]
    Nc = unit(fr.direction(normal))
    # the true line: a random direction 15-70 degrees from the foil normal
    while True:
        u = unit(rng.normal(size=3))
        if u @ Nc < 0:
            u = -u
        if 15 < math.degrees(math.acos(min(1.0, u @ Nc))) < 70:
            break
    # beams: low-index directions within 40 degrees of the normal (a tilt holder), 15 degrees or more from u,
    # 8 degrees or more apart
    beams = [b for b in IDX3 if math.degrees(math.acos(min(1.0, abs(unit(fr.direction(b)) @ Nc)))) < 40]
    beams = [b if unit(fr.direction(b)) @ Nc > 0 else [-x for x in b] for b in beams]
    for _ in range(1000):
        nv = int(rng.integers(2, 6))
        pick = [beams[i] for i in rng.choice(len(beams), size=min(nv, len(beams)), replace=False)]
        dirs = [unit(fr.direction(b)) for b in pick]
        if any(math.degrees(math.acos(min(1.0, abs(d @ u)))) < 15 for d in dirs):
            continue
        if any(math.degrees(math.acos(min(1.0, abs(p @ q)))) < 8 for p, q in itertools.combinations(dirs, 2)):
            continue
        # planes of the traces must not nearly coincide (u determined): conditioning of the plane normals
        ns = np.array([unit(np.cross(d, u)) for d in dirs])
        s = np.linalg.svd(ns, compute_uv=False)
        if s[1] < 0.15 * s[0]:
            continue
        break
    else:
        raise RuntimeError('no view set found')
    views = []
    for b in pick:
        zone = [g for g in IDX3 if g[0] * b[0] + g[1] * b[1] + g[2] * b[2] == 0]
        g = zone[int(rng.integers(len(zone)))]
        g_angle = float(rng.uniform(-180, 180))
        ax = screen_axes(fr, b, g, g_angle)
        err = float(rng.uniform(0.5, 3.0))
        line = screen_angle(u, ax) + (float(rng.normal()) * err if noise else 0.0)
        views.append({'beam': b, 'g': g, 'gAngle': g_angle, 'lineAngle': line % 180.0, 'error': err})
    t = float(rng.uniform(60, 200))
    ax0 = screen_axes(fr, views[0]['beam'], views[0]['g'], views[0]['gAngle'])
    L_true = crossing_length(fr, u, views[0]['beam'], normal, t, ax0)
    length = {'view': 0, 'length_nm': L_true * (1 + (0.03 * float(rng.normal()) if noise else 0.0)), 'lengthError_nm': 0.03 * L_true}
    sol = solve(fr, views)
    uf = sol['u']
    per_t = crossing_length(fr, uf, views[0]['beam'], normal, 1.0, ax0)
    inc = math.degrees(math.asin(min(1.0, abs(uf @ Nc))))
    # Monte Carlo error of the inclination from the fitted covariance
    mc = np.random.default_rng(int(rng.integers(1 << 31)))
    p = mc.multivariate_normal(np.zeros(2), sol['C'], size=20000)
    e1, e2 = sol['e']
    us = uf[None, :] + p[:, :1] * e1[None, :] + p[:, 1:] * e2[None, :]
    us /= np.linalg.norm(us, axis=1)[:, None]
    incs = np.degrees(np.arcsin(np.clip(np.abs(us @ Nc), 0, 1)))
    return {
        'system': system, 'cell': cell, 'metric': fr.metric().tolist(),
        'truth': fr.to_lattice(u).tolist(), 'normal': normal, 'thickness_nm': t,
        'views': views, 'length': length,
        'ref': {
            'u': fr.to_lattice(uf).tolist(), 'uPlanes': fr.to_lattice(sol['u_planes']).tolist(),
            'sigmaMajor_deg': sol['sigma'][0], 'sigmaMinor_deg': sol['sigma'][1],
            'cone_deg': math.hypot(*sol['sigma']), 'chi2': sol['chi2'],
            'inclination_deg': inc, 'inclinationErrorMC_deg': float(np.std(incs)),
            'lengthPerThickness': per_t, 'impliedThickness_nm': length['length_nm'] / per_t,
        },
    }


def main():
    req = json.load(sys.stdin)
    rng = np.random.default_rng(int(req.get('seed', 5)))
    systems = ['cubic', 'tetragonal', 'orthorhombic', 'hexagonal', 'rhombohedral']
    n = int(req.get('cases', 40))
    cases = [make_case(rng, systems[i % len(systems)], bool(req.get('noise', True))) for i in range(n)]
    json.dump({'cases': cases}, sys.stdout)


if __name__ == '__main__':
    main()
