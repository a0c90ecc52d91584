#!/usr/bin/python3
"""
Blind benchmark micrographs for `thinfoil identify`, made WITHOUT thinfoil.

An independent two-beam column integrator (Howie-Whelan equations in the
column approximation with absorption, integrated by classical fourth-order
Runge-Kutta with a fixed step, vectorised over the columns in numpy) for one
straight dislocation with the isotropic displacement field of Hirth & Lothe
(1982, ch. 3), followed by camera effects and deliberate model mismatch.
It imports nothing from thinfoil and never runs it; it follows the
conventions of the project's physics notes:

  * dphi0/dz = -(pi/xi'0) phi0 + pi i q phig,
    dphig/dz =  pi i q phi0 + [-(pi/xi'0) + 2 pi i (s + beta')] phig,
    q = 1/xi_g + i/xi'_g, beta' = d(g.R)/dz along the column;
    s > 0 when g lies inside the Ewald sphere, w = s xi_g.
  * Burgers vector FS/RH: R closes to +b round a circuit right-handed about u
    (e3 = u, e1 along the edge component, e2 = e3 x e1).
  * Image frame: ez = unit beam (into the foil), ex = imageX projected
    perpendicular to ez, ey = ez x ex (+y is down in the image); the foil is
    the slab 0 <= r.n <= t, n the foil normal; origin at the image centre on
    the entrance surface; the column through (x, y) is
    r(z) = x ex + y ey + (tau0 + z) ez, tau0 = -(x ex.n + y ey.n)/(ez.n),
    z in [0, t/(ez.n)]. A point given as (x, y, depth) in the frame of the
    scenario's beam lies on the column through (x, y) at depth along n.
  * Extinction distance xi_g = 1/(lambda |U_g|), U_g = gamma F_g/(pi Vc),
    F_g = sum_j fe_j(s) exp(-B s^2) exp(2 pi i g.r_j), fe from the 5-Gaussian
    fits of International Tables Vol. C Table 4.3.2.2 (Peng et al. 1996), read
    from Debian's python3-gemmi; absorption as a constant ratio
    xi_g/xi'_g = 0.1 with xi'_0 = xi'_g (Hirsch et al. 1965, common practice).
  * The line's core: rho^2 -> rho^2 + r_c^2 with r_c = 0.5 nm in the field
    gradient (our own choice; contrast within about 1 nm of the core is not
    physical in the column approximation anyway).

Usage:
  /usr/bin/python3 scripts/blind_micrographs.py [--out test/fixtures/blind] [--seed 20261202] [--cases 36]
      writes caseNN/scenario.json, caseNN/<condition>.png and truth.json
  /usr/bin/python3 scripts/blind_micrographs.py --check < request.json
      answers a JSON request on stdin (used by test/analysis/blindGenerator.test.ts):
      {"mode": "column", ...} perfect-crystal intensities, {"mode": "image", ...} one
      dislocation image, {"mode": "xi", ...} extinction distances.

All numbers of the benchmark are invented (an invented copper foil); the
micrographs are synthetic and say so in their scenario names.
"""
import argparse
import json
import math
import os
import sys

import numpy as np
from scipy import ndimage

# ---------------------------------------------------------------- constants
# CODATA 2018 (exact or recommended values)
H_PLANCK = 6.62607015e-34
M_E = 9.1093837015e-31
E_CHARGE = 1.602176634e-19
C_LIGHT = 299792458.0

# the invented foil: copper (fcc), a = 0.36149 nm and B = 0.55 A^2 (room
# temperature, handbook values from memory), Poisson's ratio of polycrystalline
# copper 0.34 (from memory; thinfoil's own isotropic nu comes from its Cij by
# Voigt-Reuss-Hill averaging and differs slightly: part of the model mismatch)
A_NM = 0.36149
B_DW_A2 = 0.55
NU = 0.34
KV = 200.0
ABSORPTION_RATIO = 0.1
CORE_NM = 0.5
FCC_SITES = np.array([[0, 0, 0], [0.5, 0.5, 0], [0.5, 0, 0.5], [0, 0.5, 0.5]])


def wavelength_nm(kv):
    """Relativistic electron wavelength (nm) and gamma."""
    e = kv * 1e3 * E_CHARGE
    lam = H_PLANCK / math.sqrt(2 * M_E * e * (1 + e / (2 * M_E * C_LIGHT ** 2)))
    return lam * 1e9, 1 + e / (M_E * C_LIGHT ** 2)


def xi_g_nm(hkl, kv=KV, a_nm=A_NM, b_dw=B_DW_A2):
    """Two-beam extinction distance of an fcc Cu reflection (no cos(thetaB) factor)."""
    import gemmi  # Debian python3-gemmi: IT Vol. C Table 4.3.2.2 coefficients

    el = gemmi.Element('Cu').c4322
    hkl = np.asarray(hkl, dtype=float)
    g_A = np.linalg.norm(hkl) / (a_nm * 10.0)  # 1/A
    s = g_A / 2.0
    fe = sum(a * math.exp(-b * s * s) for a, b in zip(el.a, el.b))  # A
    phase = np.exp(2j * np.pi * FCC_SITES @ hkl)
    F = abs(fe * math.exp(-b_dw * s * s) * phase.sum())
    if F < 1e-9:
        raise ValueError(f'reflection {hkl} is forbidden')
    lam_nm, gamma = wavelength_nm(kv)
    vc_A3 = (a_nm * 10.0) ** 3
    U_A2 = gamma * F / (math.pi * vc_A3)
    return 1.0 / (lam_nm * 10.0 * U_A2) / 10.0  # nm


# ---------------------------------------------------------------- geometry
def unit(v):
    v = np.asarray(v, dtype=float)
    return v / np.linalg.norm(v)


def image_frame(beam, image_x, rot_deg=0.0):
    """ez along the beam, ex = imageX projected (then turned by rot_deg about ez), ey = ez x ex."""
    ez = unit(beam)
    x = np.asarray(image_x, dtype=float)
    ex = unit(x - ez * (x @ ez))
    ey = np.cross(ez, ex)
    c, s = math.cos(math.radians(rot_deg)), math.sin(math.radians(rot_deg))
    ex, ey = c * ex + s * ey, -s * ex + c * ey
    return ex, ey, ez


def point_in_crystal(ref_beam, image_x, normal, p):
    """(x, y, depth) in the frame of the scenario's beam -> crystal Cartesian nm."""
    ex, ey, ez = image_frame(ref_beam, image_x)
    n = unit(normal)
    if n @ ez < 0:
        n = -n
    x, y, d = p
    tau0 = -(x * (ex @ n) + y * (ey @ n)) / (ez @ n)
    return x * ex + y * ey + (tau0 + d / (ez @ n)) * ez


# ---------------------------------------------------------------- elasticity
def beta_prime(r, P, b_nm, u, g_nm, ez, nu=NU, rc=CORE_NM):
    """
    d(g.R)/dz along ez at points r (..., 3), crystal Cartesian nm, for the
    isotropic straight dislocation through P along u with Burgers vector b
    (Hirth & Lothe 1982 ch. 3 formulas, analytic gradient, core smoothed).
    """
    e3 = unit(u)
    be = b_nm - e3 * (b_nm @ e3)
    nbe = np.linalg.norm(be)
    if nbe > 1e-12:
        e1 = be / nbe
    else:  # pure screw: any e1 normal to u
        t = np.array([1.0, 0, 0]) if abs(e3[0]) < 0.9 else np.array([0, 1.0, 0])
        e1 = unit(t - e3 * (t @ e3))
    e2 = np.cross(e3, e1)
    d = r - P
    x = d @ e1
    y = d @ e2
    r2 = x * x + y * y + rc * rc
    r4 = r2 * r2
    k = 1.0 / (1.0 - nu)
    # partial derivatives of R1, R2 (edge part) and R3 (screw part)
    c = nbe / (2 * np.pi)
    dR1dx = c * (-y / r2 + 0.5 * k * y * (y * y - x * x) / r4)
    dR1dy = c * (x / r2 + 0.5 * k * x * (x * x - y * y) / r4)
    a = (1 - 2 * nu) / (4 * (1 - nu))
    dR2dx = -c * (a * 2 * x / r2 + 0.25 * k * 4 * x * y * y / r4)
    dR2dy = -c * (a * 2 * y / r2 - 0.25 * k * 4 * x * x * y / r4)
    bs = (b_nm @ e3) / (2 * np.pi)
    dR3dx = bs * (-y / r2)
    dR3dy = bs * (x / r2)
    g1, g2, g3 = g_nm @ e1, g_nm @ e2, g_nm @ e3
    dgRdx = g1 * dR1dx + g2 * dR2dx + g3 * dR3dx
    dgRdy = g1 * dR1dy + g2 * dR2dy + g3 * dR3dy
    return dgRdx * (ez @ e1) + dgRdy * (ez @ e2)


def g_dot_R(r, P, b_nm, u, g_nm, nu=NU, unwrap=False):
    """g.R itself (no core smoothing), for the finite-difference and circuit self-checks."""
    e3 = unit(u)
    be = b_nm - e3 * (b_nm @ e3)
    nbe = np.linalg.norm(be)
    e1 = be / nbe
    e2 = np.cross(e3, e1)
    d = r - P
    x = d @ e1
    y = d @ e2
    th = np.unwrap(np.arctan2(y, x)) if unwrap else np.arctan2(y, x)
    r2 = x * x + y * y
    R1 = nbe / (2 * np.pi) * (th + x * y / (2 * (1 - nu) * r2))
    R2 = -nbe / (2 * np.pi) * ((1 - 2 * nu) / (4 * (1 - nu)) * np.log(r2) + (x * x - y * y) / (4 * (1 - nu) * r2))
    R3 = (b_nm @ e3) / (2 * np.pi) * th
    return (g_nm @ e1) * R1 + (g_nm @ e2) * R2 + (g_nm @ e3) * R3


# ---------------------------------------------------------------- integrator
def integrate_columns(beta_grid, h, s, xi, xiabs, xiabs0):
    """
    RK4 with fixed step h (nm) on the two-beam equations for many columns at
    once. beta_grid[2k] is beta' at z = k h, beta_grid[2k+1] at z = (k+1/2) h
    (shape (2 N + 1, ncol)). Returns phi0, phig at the exit surface.
    """
    q = 1.0 / xi + 1j / xiabs
    a0 = -np.pi / xiabs0
    ncol = beta_grid.shape[1]
    p0 = np.ones(ncol, dtype=complex)
    pg = np.zeros(ncol, dtype=complex)
    piq = np.pi * 1j * q

    def f(p0, pg, bp):
        return a0 * p0 + piq * pg, piq * p0 + (a0 + 2j * np.pi * (s + bp)) * pg

    n = (beta_grid.shape[0] - 1) // 2
    for k in range(n):
        b0, b1, b2 = beta_grid[2 * k], beta_grid[2 * k + 1], beta_grid[2 * k + 2]
        k10, k1g = f(p0, pg, b0)
        k20, k2g = f(p0 + 0.5 * h * k10, pg + 0.5 * h * k1g, b1)
        k30, k3g = f(p0 + 0.5 * h * k20, pg + 0.5 * h * k2g, b1)
        k40, k4g = f(p0 + h * k30, pg + h * k3g, b2)
        p0 = p0 + h / 6 * (k10 + 2 * k20 + 2 * k30 + k40)
        pg = pg + h / 6 * (k1g + 2 * k2g + 2 * k3g + k4g)
    return p0, pg


def perfect_crystal(t, s, xi, xiabs, xiabs0, h=0.1):
    """Perfect-crystal bright and dark field after thickness t (beta' = 0)."""
    n = max(1, int(math.ceil(t / h)))
    p0, pg = integrate_columns(np.zeros((2 * n + 1, 1)), t / n, s, xi, xiabs, xiabs0)
    return float(abs(p0[0]) ** 2), float(abs(pg[0]) ** 2)


def dislocation_image(spec, h=0.2):
    """
    Bright- and dark-field intensities (height x width) of one straight
    dislocation. spec: width, height, pixel_nm, shift_nm (x, y), a_nm, beam,
    imageX, rot_deg, normal, thickness_nm, refBeam, point_nm (x, y, depth in
    the reference frame), b and line (lattice units), g (hkl), s_per_nm, xi_nm,
    xiAbs_nm, xiAbs0_nm, nu.
    """
    a = spec['a_nm']
    W, H, p = spec['width'], spec['height'], spec['pixel_nm']
    ex, ey, ez = image_frame(spec['beam'], spec['imageX'], spec.get('rot_deg', 0.0))
    n = unit(spec['normal'])
    if n @ ez < 0:
        n = -n
    t = spec['thickness_nm']
    L = t / (ez @ n)
    nst = max(1, int(math.ceil(L / h)))
    hh = L / nst
    P = point_in_crystal(spec['refBeam'], spec['imageX'], spec['normal'], spec['point_nm'])
    b_nm = np.asarray(spec['b'], dtype=float) * a
    u = unit(np.asarray(spec['line'], dtype=float))
    g_nm = np.asarray(spec['g'], dtype=float) / a
    sx, sy = spec.get('shift_nm', (0.0, 0.0))
    xs = (np.arange(W) + 0.5 - W / 2) * p + sx
    ys = (np.arange(H) + 0.5 - H / 2) * p + sy
    X, Y = np.meshgrid(xs, ys)  # (H, W): row = y
    X = X.ravel()
    Y = Y.ravel()
    tau0 = -(X * (ex @ n) + Y * (ey @ n)) / (ez @ n)
    zs = np.arange(2 * nst + 1) * (hh / 2)
    bf = np.empty(W * H)
    df = np.empty(W * H)
    chunk = 1024
    for c0 in range(0, W * H, chunk):
        sl = slice(c0, min(W * H, c0 + chunk))
        base = X[sl, None] * ex + Y[sl, None] * ey + tau0[sl, None] * ez  # (m, 3)
        r = base[None, :, :] + zs[:, None, None] * ez  # (2N+1, m, 3)
        bp = beta_prime(r, P, b_nm, u, g_nm, ez, spec.get('nu', NU))
        p0, pg = integrate_columns(bp, hh, spec['s_per_nm'], spec['xi_nm'], spec['xiAbs_nm'], spec['xiAbs0_nm'])
        bf[sl] = np.abs(p0) ** 2
        df[sl] = np.abs(pg) ** 2
    return bf.reshape(H, W), df.reshape(H, W)


# ---------------------------------------------------------------- the benchmark cases
# The invented foil has the normal [1 1 2]; the micrographs are taken with the
# beam at most 30 degrees from it, each centred on the same point of the
# entrance surface (the image centre of every view, as thinfoil places it).
# (beam, g) pairs of two-beam conditions, g exactly perpendicular to the beam:
NORMAL = [1, 1, 2]
IMAGE_X = [1, -1, 0]
CONDITIONS = [
    ([1, 1, 2], [1, 1, -1]),
    ([1, 1, 2], [2, -2, 0]),
    ([1, 1, 2], [3, -1, -1]),
    ([1, 1, 1], [0, 2, -2]),
    ([1, 1, 1], [2, 0, -2]),
    ([0, 1, 1], [2, 0, 0]),
    ([0, 1, 1], [1, -1, 1]),
    ([1, 0, 1], [0, 2, 0]),
    ([1, 0, 1], [-1, 1, 1]),
]
B110 = [np.array(v) / 2 for v in ([1, 1, 0], [1, -1, 0], [1, 0, 1], [1, 0, -1], [0, 1, 1], [0, 1, -1])]
B100 = [np.array(v, dtype=float) for v in ([1, 0, 0], [0, 1, 0], [0, 0, 1])]
# candidate line directions (small indices); each case takes one that crosses the foil at 30-70 degrees
# from its normal and is more than 20 degrees from every beam of the case
LINES = [list(v) for v in {(i, j, k) for i in range(-3, 4) for j in range(-3, 4) for k in range(-3, 4) if (i, j, k) > (0, 0, 0) and math.gcd(math.gcd(abs(i), abs(j)), abs(k)) == 1}]
LINES.sort()


def fmt_b(v):
    """A Burgers vector as a scenario string: 1/2[1 0 -1] or [1 0 0]."""
    v = np.asarray(v, dtype=float)
    if np.allclose(v * 2, np.round(v * 2)) and not np.allclose(v, np.round(v)):
        return '1/2[' + ' '.join(str(int(round(2 * c))) for c in v) + ']'
    return '[' + ' '.join(str(int(round(c))) for c in v) + ']'


def angle_deg(a, b):
    a, b = unit(a), unit(b)
    return math.degrees(math.acos(max(-1.0, min(1.0, abs(a @ b)))))


def rotate_about(v, axis, deg):
    """Rodrigues rotation of v about axis by deg."""
    k = unit(axis)
    th = math.radians(deg)
    return v * math.cos(th) + np.cross(k, v) * math.sin(th) + k * (k @ v) * (1 - math.cos(th))


def choose_conditions(rng, b_true, in_list):
    """3-5 conditions whose |g.b| pattern tells b apart from every other 1/2<110> direction (for b in the list)."""
    for _ in range(1000):
        m = int(rng.integers(3, 6))
        idx = sorted(rng.choice(len(CONDITIONS), size=m, replace=False))
        gs = [np.array(CONDITIONS[i][1], dtype=float) for i in idx]
        visible = sum(abs(g @ b_true) > 0.25 for g in gs)
        if visible < 2:
            continue
        if in_list:
            # no other direction (other than -b) with the same |g.b| in every condition
            pat = [round(abs(g @ b_true), 3) for g in gs]
            others = [o for o in B110 if not (np.allclose(o, b_true) or np.allclose(o, -b_true))]
            if any(all(round(abs(g @ o), 3) == q for g, q in zip(gs, pat)) for o in others):
                continue
        return idx
    raise RuntimeError('no condition set found')


def camera(intensity, rng, snr, sigma_noise_ref):
    """Blur, illumination gradient, noise, gamma, 8-bit; returns (grey uint8, settings)."""
    H, W = intensity.shape
    blur_px = float(rng.uniform(0.5, 1.2))
    img = ndimage.gaussian_filter(intensity, blur_px, mode='nearest')
    gx, gy = rng.uniform(-0.06, 0.06, size=2)
    yy, xx = np.mgrid[0:H, 0:W]
    img = img * (1 + gx * (xx / (W - 1) - 0.5) * 2 + gy * (yy / (H - 1) - 0.5) * 2)
    sigma = sigma_noise_ref / snr
    img = img + rng.normal(0.0, sigma, size=img.shape)
    img = np.clip(img, 0, None)
    gamma = float(rng.choice([1.0, 1.0, rng.uniform(0.75, 0.9), rng.uniform(1.1, 1.3)]))
    top = float(np.percentile(img, 99.9)) * 1.08
    grey = np.clip(np.round(255 * (img / top) ** gamma), 0, 255).astype(np.uint8)
    return grey, {'blur_px': blur_px, 'gradient': [float(gx), float(gy)], 'snr': float(snr), 'noiseSigma': float(sigma), 'gamma': gamma}


def write_png(path, grey):
    from PIL import Image  # Debian python3-pil

    Image.fromarray(grey, 'L').save(path, optimize=True)


def make_case(rng, idx, out_dir, kind):
    """One case: scenario.json, one PNG per condition; returns its truth record."""
    # the true Burgers vector and the candidate list given to identify
    if kind == 'in':
        b_true = B110[int(rng.integers(6))] * (1 if rng.random() < 0.5 else -1)
        candidates = ['1/2<110>']
    elif kind == 'a100':
        b_true = B100[int(rng.integers(3))] * (1 if rng.random() < 0.5 else -1)
        candidates = ['1/2<110>']
    else:  # a 1/2<110> vector left out of an explicit list
        j = int(rng.integers(6))
        b_true = B110[j] * (1 if rng.random() < 0.5 else -1)
        # explicit vectors (thinfoil adds the opposite sign of each)
        candidates = [{'b': fmt_b(v)} for i, v in enumerate(B110) if i != j]
    conds = choose_conditions(rng, b_true, kind == 'in')
    normal = np.array(NORMAL, dtype=float)
    while True:
        line = np.array(LINES[int(rng.integers(len(LINES)))], dtype=float) * (1 if rng.random() < 0.5 else -1)
        if all(angle_deg(line, CONDITIONS[i][0]) > 20 for i in conds) and 30 < angle_deg(line, normal) < 70:
            break
    t_nom = float(rng.choice([90.0, 100.0, 110.0, 120.0]))
    depth_nom = round(t_nom * float(rng.uniform(0.35, 0.55)), 1)
    # model mismatch: what the generator uses differs from what the scenario states
    t_true = t_nom * float(rng.uniform(0.85, 1.15))
    depth_true = depth_nom * float(rng.uniform(0.85, 1.15))
    depth_true = min(depth_true, 0.9 * t_true)
    axis = np.cross(unit(line), unit(rng.normal(size=3)))
    u_true = rotate_about(unit(line), axis, 3.0)
    pixel = 1.2
    size = 64
    scenario_conds = []
    micro = {}
    records = []
    images = []
    for ci in conds:
        beam, g = CONDITIONS[ci]
        g = np.array(g) * (1 if rng.random() < 0.5 else -1)
        cid = 'g' + ''.join(str(int(c)) if c >= 0 else 'm' + str(int(-c)) for c in g)
        w_nom = round(float(rng.uniform(0.4, 1.0)), 2)
        w_true = w_nom + float(rng.uniform(-0.2, 0.2))
        xi = xi_g_nm(g)
        field = 'df' if rng.random() < 0.25 else 'bf'
        rot = float(rng.uniform(-180, 180))
        shift = rng.uniform(-3, 3, size=2)
        spec = {
            'width': size, 'height': size, 'pixel_nm': pixel, 'shift_nm': [float(shift[0]), float(shift[1])], 'a_nm': A_NM,
            'beam': beam, 'imageX': IMAGE_X, 'rot_deg': rot, 'normal': NORMAL, 'thickness_nm': t_true, 'refBeam': NORMAL,
            'point_nm': [0.0, 0.0, depth_true], 'b': b_true.tolist(), 'line': u_true.tolist(), 'g': g.tolist(),
            's_per_nm': w_true / xi, 'xi_nm': xi, 'xiAbs_nm': xi / ABSORPTION_RATIO, 'xiAbs0_nm': xi / ABSORPTION_RATIO, 'nu': NU,
        }
        bf, df = dislocation_image(spec)
        I = bf if field == 'bf' else df
        # direction of g in this image: counter-clockwise from +x, +y down
        ex, ey, _ = image_frame(beam, IMAGE_X, rot)
        g_cart = g / A_NM
        g_angle = math.degrees(math.atan2(-(g_cart @ ey), g_cart @ ex))
        images.append((cid, field, I))
        scenario_conds.append({'id': cid, 'g': [int(c) for c in g], 'w': w_nom, 'beam': beam})
        records.append({'id': cid, 'g': [int(c) for c in g], 'beam': beam, 'field': field, 'w': w_nom, 'wTrue': w_true, 'xi_nm': xi,
                        'gAngle_deg': g_angle, 'rotation_deg': rot, 'shift_nm': spec['shift_nm'], 'gb': float(g @ b_true)})
        micro[cid] = {'field': field, 'pixel_nm': pixel, 'gAngle_deg': round(g_angle, 2), 'blur_nm': 0.8, 'maxShift_nm': 10}
    # noise: sigma = (peak contrast of the micrograph, at least 0.3 x the case's largest) / SNR, SNR uniform in 2..8
    peaks = [float(np.max(np.abs(I - np.median(I)))) for _, _, I in images]
    case_dir = os.path.join(out_dir, f'case{idx:02d}')
    os.makedirs(case_dir, exist_ok=True)
    for k, ((cid, field, I), rec) in enumerate(zip(images, records)):
        snr = float(rng.uniform(2, 8))
        grey, cam = camera(I, rng, snr, max(peaks[k], 0.3 * max(peaks)))
        rec['camera'] = cam
        micro[cid]['intensity'] = 'linear' if cam['gamma'] == 1.0 else 'display'
        write_png(os.path.join(case_dir, f'{cid}.png'), grey)
    scenario = {
        'name': f'blind case {idx:02d} (SYNTHETIC micrographs of an invented copper foil, scripts/blind_micrographs.py)',
        'material': 'Cu', 'kV': KV,
        'foil': {'thickness_nm': t_nom, 'normal': NORMAL},
        'beam': NORMAL, 'imageX': IMAGE_X,
        'image': {'width_px': size, 'height_px': size, 'pixel_nm': pixel},
        'absorption': ABSORPTION_RATIO, 'elasticity': 'isotropic', 'surfaces': 'infinite',
        'conditions': scenario_conds,
        'defects': [{'type': 'dislocation', 'b': '1/2[1 1 0]' if kind != 'out' else candidates[0]['b'], 'line': [int(c) for c in line], 'point_nm': [0, 0, depth_nom]}],
        'candidates': candidates,
        'micrographs': micro,
    }
    with open(os.path.join(case_dir, 'scenario.json'), 'w') as f:
        json.dump(scenario, f, indent=1)
        f.write('\n')
    return {
        'case': f'case{idx:02d}', 'b': fmt_b(b_true), 'bVector': b_true.tolist(), 'inList': kind == 'in', 'kind': kind,
        'candidates': candidates,
        'mismatch': {'thickness_nm': [t_nom, t_true], 'depth_nm': [depth_nom, depth_true], 'lineStated': [int(c) for c in line], 'lineTrue': u_true.tolist(), 'lineOff_deg': 3.0},
        'conditions': records,
    }


def generate(out_dir, seed, ncases):
    rng = np.random.default_rng(seed)
    os.makedirs(out_dir, exist_ok=True)
    kinds = ['in'] * ncases
    # every sixth case has its true b outside the candidate list (a<100>, or a 1/2<110> left out of the list)
    for i in range(ncases):
        if i % 6 == 5:
            kinds[i] = 'a100' if (i // 6) % 2 == 0 else 'out'
    truth = []
    for i, kind in enumerate(kinds):
        truth.append(make_case(rng, i, out_dir, kind))
        print(f'case{i:02d} {kind} b = {truth[-1]["b"]}', file=sys.stderr, flush=True)
    meta = {
        'note': 'SYNTHETIC micrographs of an invented copper foil, made by scripts/blind_micrographs.py (independent of thinfoil); not measurements',
        'seed': seed, 'kV': KV, 'a_nm': A_NM, 'debyeWaller_A2': B_DW_A2, 'poissonRatio': NU, 'absorptionRatio': ABSORPTION_RATIO, 'core_nm': CORE_NM,
        'camera': 'Gaussian blur 0.5-1.2 px, illumination gradient up to +-6 %, Gaussian noise with SNR 2-8 (peak contrast over noise sigma), gamma 1 or 0.75-0.9 or 1.1-1.3, 8-bit',
        'mismatch': 'thickness x U(0.85, 1.15), depth x U(0.85, 1.15), w + U(-0.2, 0.2), line direction turned by 3 degrees, stated point spread 0.8 nm',
        'cases': truth,
    }
    with open(os.path.join(out_dir, 'truth.json'), 'w') as f:
        json.dump(meta, f, indent=1)
        f.write('\n')


def check(req):
    mode = req['mode']
    if mode == 'column':
        out = []
        for t in req['thickness_nm']:
            bf, df = perfect_crystal(t, req['s_per_nm'], req['xi_nm'], req['xiAbs_nm'], req['xiAbs0_nm'], req.get('step_nm', 0.1))
            out.append({'thickness_nm': t, 'bf': bf, 'df': df})
        return {'results': out}
    if mode == 'image':
        bf, df = dislocation_image(req['spec'], req.get('step_nm', 0.2))
        return {'bf': bf.ravel().tolist(), 'df': df.ravel().tolist()}
    if mode == 'xi':
        return {'xi_nm': [xi_g_nm(h, req.get('kV', KV)) for h in req['hkl']]}
    if mode == 'field':
        # finite differences of g.R against the analytic beta', and g.R round a circuit
        P = np.array(req['P'], dtype=float)
        b = np.array(req['b'], dtype=float) * A_NM
        u = unit(req['line'])
        g = np.array(req['g'], dtype=float) / A_NM
        ez = unit(req['beam'])
        pts = np.array(req['points'], dtype=float)
        hstep = 1e-4
        fd = (g_dot_R(pts + hstep * ez, P, b, u, g) - g_dot_R(pts - hstep * ez, P, b, u, g)) / (2 * hstep)
        an = beta_prime(pts, P, b, u, g, ez, rc=0.0)
        e3 = u
        t = np.array([1.0, 0, 0]) if abs(e3[0]) < 0.9 else np.array([0, 1.0, 0])
        m = unit(t - e3 * (t @ e3))
        nn = np.cross(e3, m)
        ang = np.linspace(0, 2 * np.pi, 2001)
        circ = P + 3.0 * (np.cos(ang)[:, None] * m + np.sin(ang)[:, None] * nn)
        gr = g_dot_R(circ, P, b, u, g, unwrap=True)
        return {'fd': fd.tolist(), 'analytic': an.tolist(), 'circuit': float(gr[-1] - gr[0]), 'gb': float(g @ b)}
    raise ValueError(f'unknown mode {mode}')


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument('--out', default=os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'test', 'fixtures', 'blind'))
    ap.add_argument('--seed', type=int, default=20261202)
    ap.add_argument('--cases', type=int, default=36)
    ap.add_argument('--check', action='store_true', help='answer a JSON request on stdin')
    a = ap.parse_args()
    if a.check:
        json.dump(check(json.load(sys.stdin)), sys.stdout)
        return
    generate(os.path.normpath(a.out), a.seed, a.cases)


if __name__ == '__main__':
    main()
