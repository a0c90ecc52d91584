#!/usr/bin/env python3
"""Independent reference for trace analysis (thinfoil `traces`): the line
direction u from the screen angles of its traces in several beam directions.

Method (independent of src/analysis/traces.ts and src/geometry/frames.ts):
for each view, scipy.spatial.transform.Rotation.align_vectors builds the
rotation taking crystal Cartesian vectors to screen coordinates (x right,
y down, z into the screen = along the beam) such that the beam goes to +z and
g to the screen direction at gAngle (counter-clockwise from +x with y down:
screen vector (cos a, -sin a, 0)). A candidate u is rotated into each screen
and its angle atan2(-y, x) compared with the measured line angle (modulo 180).
u is found by a brute-force search over 40000 points on the sphere (Fibonacci
lattice) followed by scipy.optimize.minimize (Nelder-Mead) on the two angles
of u. Cubic crystals only (Cartesian = lattice directions).

stdin: {"views": [{"beam": [..], "g": [..], "gAngle": deg, "lineAngle": deg}, ...]}
stdout: {"u": [x, y, z]} (unit, sense with u . first trace >= 0 not fixed: compare up to sign)
"""
import json
import sys

import numpy as np
from scipy.optimize import minimize
from scipy.spatial.transform import Rotation


def screen_rotation(beam, g, g_angle_deg):
    b = np.asarray(beam, float)
    b /= np.linalg.norm(b)
    gv = np.asarray(g, float)
    gv = gv - b * gv.dot(b)
    gv /= np.linalg.norm(gv)
    a = np.radians(g_angle_deg)
    # rotation R with R @ b = (0,0,1) and R @ g = (cos a, -sin a, 0); both pairs orthonormal, so exact
    rot, _ = Rotation.align_vectors([[0.0, 0.0, 1.0], [np.cos(a), -np.sin(a), 0.0]], [b, gv])
    return rot


def wrap(d):
    return (d + 90.0) % 180.0 - 90.0


def main():
    data = json.load(sys.stdin)
    views = data["views"]
    rots = [screen_rotation(v["beam"], v["g"], v["gAngle"]) for v in views]
    meas = np.array([v["lineAngle"] for v in views], float)

    def cost_u(u):
        s = 0.0
        for r, m in zip(rots, meas):
            p = r.apply(u)
            s += wrap(m - np.degrees(np.arctan2(-p[..., 1], p[..., 0]))) ** 2
        return s

    n = 40000
    i = np.arange(n) + 0.5
    z = 1 - 2 * i / n
    phi = np.pi * (1 + 5 ** 0.5) * i
    pts = np.stack([np.sqrt(1 - z * z) * np.cos(phi), np.sqrt(1 - z * z) * np.sin(phi), z], axis=1)
    best = pts[np.argmin(cost_u(pts))]

    def sph(t):
        return np.array([np.sin(t[0]) * np.cos(t[1]), np.sin(t[0]) * np.sin(t[1]), np.cos(t[0])])

    t0 = [np.arccos(np.clip(best[2], -1, 1)), np.arctan2(best[1], best[0])]
    res = minimize(lambda t: cost_u(sph(t)), t0, method="Nelder-Mead", options={"xatol": 1e-10, "fatol": 1e-14, "maxiter": 20000})
    u = sph(res.x)
    json.dump({"u": u.tolist(), "cost": float(res.fun)}, sys.stdout)


if __name__ == "__main__":
    main()
