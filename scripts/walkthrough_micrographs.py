#!/usr/bin/python3
"""
SYNTHETIC micrographs for the README's identification walk-through
(scenarios/walkthrough/), made WITHOUT thinfoil.

It reuses the independent generator of the blind benchmark
(scripts/blind_micrographs.py: its own RK4 two-beam column integrator with
absorption and the isotropic field of a straight dislocation, Hirth & Lothe
1982, checked in test/analysis/blindGenerator.test.ts) for one invented
defect in an invented copper foil, seen in three beam directions:

  * foil normal [1 1 2], 200 kV, true thickness 108 nm (the user will state
    100 nm), absorption ratio 0.1, isotropic elasticity (nu 0.34);
  * one straight dislocation, b = 1/2[1 1 0], gliding on (1 -1 1); its line
    is [0 1 1] turned by 3 degrees about the glide-plane normal (so it is not
    exactly a low-index direction), crossing the foil; at the image centre
    (on the entrance surface of the [1 1 2] view) it lies 54 nm deep;
  * four micrographs, 64 x 64 pixels of 1.5 nm: two of the same area along
    [1 1 2] (g = 1 1 -1 and 2 -2 0, same image rotation and position), one
    along [1 0 1] (g = 0 2 0) and one along [1 1 1] (g = 2 0 -2, dark field);
    true w differs from the stated w by up to 0.18;
  * camera effects: blur 0.8 px, an illumination gradient of 3 %, Gaussian
    noise at a signal-to-noise ratio of 5 (peak contrast over noise sigma),
    8-bit grey levels, linear (no gamma).

Besides the PNGs it writes truth.json: the true values, the trace angles
the generator's geometry gives (the direction of g and of the projected line
on each micrograph, counter-clockwise from +x with +y down) and the projected
length of the line in the [1 1 2] view. Nothing here is a measurement.

Usage:
  /usr/bin/python3 scripts/walkthrough_micrographs.py [--out scenarios/walkthrough] [--seed 14]
"""
import argparse
import json
import math
import os
import sys

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import blind_micrographs as gen  # noqa: E402  (the independent generator, same folder)

NORMAL = [1, 1, 2]
IMAGE_X = [1, -1, 0]
B_TRUE = [0.5, 0.5, 0.0]
GLIDE = [1, -1, 1]
T_TRUE = 108.0
DEPTH_TRUE = 54.0
PIXEL = 1.5
SIZE = 64
SNR = 5.0
# (id, beam, g, field, stated w, true w, image rotation (deg), image shift (nm))
MICROGRAPHS = [
    ('g11m1', [1, 1, 2], [1, 1, -1], 'bf', 0.6, 0.72, 25.0, [1.2, -0.8]),
    ('g2m20', [1, 1, 2], [2, -2, 0], 'bf', 0.5, 0.38, 25.0, [1.2, -0.8]),
    ('g020', [1, 0, 1], [0, 2, 0], 'bf', 0.8, 0.95, -60.0, [-2.0, 1.5]),
    ('g20m2', [1, 1, 1], [2, 0, -2], 'df', 0.7, 0.52, 140.0, [0.5, 2.5]),
]


def true_line():
    """[0 1 1] turned by 3 degrees about the (1 -1 1) normal: stays in the glide plane."""
    return gen.rotate_about(gen.unit([0, 1, 1]), np.asarray(GLIDE, float), 3.0)


def screen_angle_deg(v, ex, ey):
    """Direction of the Cartesian vector v on the micrograph: counter-clockwise from +x, +y down."""
    return math.degrees(math.atan2(-(v @ ey), v @ ex))


def projected_length_nm(u, beam, t):
    """Length on the micrograph of the segment of the line between the two foil surfaces (cubic: Cartesian = lattice)."""
    n = gen.unit(NORMAL)
    seg = u * (t / abs(u @ n))  # from surface to surface along u
    ez = gen.unit(beam)
    return float(np.linalg.norm(seg - ez * (seg @ ez)))


def main():
    ap = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    ap.add_argument('--out', default=os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'scenarios', 'walkthrough'))
    ap.add_argument('--seed', type=int, default=14)
    a = ap.parse_args()
    out = os.path.normpath(a.out)
    os.makedirs(out, exist_ok=True)
    rng = np.random.default_rng(a.seed)
    u = true_line()
    b = np.asarray(B_TRUE, float)
    images = []
    records = []
    for cid, beam, g, field, w_stated, w_true, rot, shift in MICROGRAPHS:
        xi = gen.xi_g_nm(g)
        spec = {
            'width': SIZE, 'height': SIZE, 'pixel_nm': PIXEL, 'shift_nm': shift, 'a_nm': gen.A_NM,
            'beam': beam, 'imageX': IMAGE_X, 'rot_deg': rot, 'normal': NORMAL, 'thickness_nm': T_TRUE, 'refBeam': NORMAL,
            'point_nm': [0.0, 0.0, DEPTH_TRUE], 'b': B_TRUE, 'line': u.tolist(), 'g': g,
            's_per_nm': w_true / xi, 'xi_nm': xi, 'xiAbs_nm': xi / gen.ABSORPTION_RATIO, 'xiAbs0_nm': xi / gen.ABSORPTION_RATIO, 'nu': gen.NU,
        }
        bf, df = gen.dislocation_image(spec)
        img = bf if field == 'bf' else df
        ex, ey, _ = gen.image_frame(beam, IMAGE_X, rot)
        g_cart = np.asarray(g, float) / gen.A_NM
        images.append(img)
        records.append({
            'id': cid, 'beam': beam, 'g': g, 'field': field, 'wStated': w_stated, 'wTrue': w_true, 'xi_nm': xi,
            'gb': float(np.asarray(g) @ b), 'rotation_deg': rot, 'shift_nm': shift,
            'gAngle_deg': screen_angle_deg(g_cart, ex, ey),
            'lineAngle_deg': screen_angle_deg(u, ex, ey) % 180.0,
            'projectedLength_nm': projected_length_nm(u, beam, T_TRUE),
        })
    # noise: sigma = (largest peak contrast of the four) / SNR, the same for every micrograph of the set
    peak = max(float(np.max(np.abs(I - np.median(I)))) for I in images)
    sigma = peak / SNR
    H, W = SIZE, SIZE
    yy, xx = np.mgrid[0:H, 0:W]
    for img, rec in zip(images, records):
        I = gen.ndimage.gaussian_filter(img, 0.8, mode='nearest')
        I = I * (1 + 0.03 * (xx / (W - 1) - 0.5) * 2)
        I = np.clip(I + rng.normal(0.0, sigma, size=I.shape), 0, None)
        top = float(np.percentile(I, 99.9)) * 1.08
        grey = np.clip(np.round(255 * I / top), 0, 255).astype(np.uint8)
        gen.write_png(os.path.join(out, f'{rec["id"]}.png'), grey)
        rec['camera'] = {'blur_px': 0.8, 'gradientX': 0.03, 'noiseSigma': sigma, 'snr': SNR, 'greyOfIntensity1': 255 / top}
        print(f'{rec["id"]}: g.b = {rec["gb"]:.1f}, gAngle {rec["gAngle_deg"]:.2f}, line {rec["lineAngle_deg"]:.2f} deg, '
              f'projected length {rec["projectedLength_nm"]:.1f} nm', file=sys.stderr)
    truth = {
        'note': 'SYNTHETIC micrographs of an invented copper foil, made by scripts/walkthrough_micrographs.py with the '
                'independent generator of scripts/blind_micrographs.py (it does not use thinfoil); not measurements',
        'seed': a.seed, 'kV': gen.KV, 'a_nm': gen.A_NM, 'poissonRatio': gen.NU, 'absorptionRatio': gen.ABSORPTION_RATIO,
        'foilNormal': NORMAL, 'imageX': IMAGE_X, 'thickness_nm': T_TRUE, 'depthAtCentre_nm': DEPTH_TRUE,
        'b': '1/2[1 1 0]', 'bVector': B_TRUE, 'glidePlane': GLIDE,
        'line': u.tolist(), 'lineNote': '[0 1 1] turned by 3 degrees about the (1 -1 1) normal',
        'pixel_nm': PIXEL, 'size_px': SIZE,
        'micrographs': records,
    }
    with open(os.path.join(out, 'truth.json'), 'w') as f:
        json.dump(truth, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
