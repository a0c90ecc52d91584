/**
 * Holder geometry: round trips beam <-> tilts, an independent construction
 * of the specimen rotation (Rodrigues' rotation formula about the carried
 * cradle axis, written here separately), and a case worked by hand.
 */
import { describe, expect, it } from 'vitest';
import { beamAtTilts, orientation, orientationFromBeam, reachableTilts, tiltsForBeam, type HolderKind } from '../../src/planning/holder.js';
import type { Vec3 } from '../../src/math/vec3.js';

const DEG = Math.PI / 180;

/** Rodrigues: rotate v by angle (radians, right-handed) about the unit axis k. */
function rodrigues(v: Vec3, k: Vec3, angle: number): Vec3 {
  const c = Math.cos(angle), s = Math.sin(angle);
  const kv = k[0] * v[0] + k[1] * v[1] + k[2] * v[2];
  const kxv: Vec3 = [k[1] * v[2] - k[2] * v[1], k[2] * v[0] - k[0] * v[2], k[0] * v[1] - k[1] * v[0]];
  return [0, 1, 2].map((i) => v[i] * c + kxv[i] * s + k[i] * kv * (1 - c)) as unknown as Vec3;
}

/**
 * Independent construction: rotate the specimen's three axes physically
 * (primary about the fixed X, then secondary about the cradle axis carried
 * by the primary tilt: Y for double tilt, the foil normal for a rotation
 * holder), then read which specimen direction lies along the beam Z:
 * v_i = (rotated axis i) . Z.
 */
function beamByRotatingSpecimen(kind: HolderKind, a_deg: number, b_deg: number): Vec3 {
  const X: Vec3 = [1, 0, 0];
  const second0: Vec3 = kind === 'double' ? [0, 1, 0] : [0, 0, 1];
  const axes: Vec3[] = [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
  const carried = rodrigues(second0, X, a_deg * DEG); // cradle axis after the primary tilt
  const rotated = axes.map((e) => rodrigues(rodrigues(e, X, a_deg * DEG), carried, b_deg * DEG));
  return [rotated[0][2], rotated[1][2], rotated[2][2]];
}

const cubic = orientation([0, 0, 1], [1, 0, 0]);

describe('holder geometry', () => {
  it('matches an independent rotation of the specimen (Rodrigues formula) for both holders', () => {
    for (const kind of ['double', 'rotation'] as const) {
      for (const [a, b] of [[0, 0], [17, -23], [-35, 40], [60, 170], [-5, -120]]) {
        const v = beamAtTilts(cubic, kind, { primary_deg: a, secondary_deg: b });
        const w = beamByRotatingSpecimen(kind, a, b);
        for (let i = 0; i < 3; i++) expect(v[i]).toBeCloseTo(w[i], 12);
      }
    }
  });

  it('round trips tilts -> beam -> tilts and beam -> tilts -> beam to 1e-9', () => {
    const o = orientation([1, 1, 2], [1, -1, 0]);
    for (const kind of ['double', 'rotation'] as const) {
      for (let i = 0; i < 200; i++) {
        const a = -80 + (160 * ((i * 37) % 200)) / 200 + 0.3;
        const b = -170 + (340 * ((i * 73) % 200)) / 200 + 0.7;
        const v = beamAtTilts(o, kind, { primary_deg: a, secondary_deg: b });
        const sols = tiltsForBeam(o, kind, v);
        // every solution gives the same beam back
        for (const s of sols) {
          const v2 = beamAtTilts(o, kind, s);
          for (let j = 0; j < 3; j++) expect(Math.abs(v2[j] - v[j])).toBeLessThan(1e-9);
        }
        // and one solution is the tilt pair we started from
        const back = sols.some((s) => Math.abs(s.primary_deg - a) < 1e-9 && Math.abs(s.secondary_deg - b) < 1e-9);
        expect(back).toBe(true);
      }
    }
  });

  it('a case worked by hand: [111] from a (001) foil with [100] on the primary axis', () => {
    // By hand: beam [111]/sqrt(3) = (x, y, z) = (1, 1, 1)/sqrt(3) in the zero-tilt frame.
    // Double tilt: sin(alpha) = y = 1/sqrt(3) -> alpha = 35.2644 deg; tan(beta) = -x/z = -1 -> beta = -45 deg.
    // Check forward: -sin(-45) cos(35.26) = 0.70711 * 0.81650 = 0.57735 = 1/sqrt(3). Yes.
    const [t] = tiltsForBeam(cubic, 'double', [1, 1, 1]);
    expect(t.primary_deg).toBeCloseTo(35.26439, 4);
    expect(t.secondary_deg).toBeCloseTo(-45, 9);
    // Rotation holder: cos(alpha) = z = 1/sqrt(3) -> alpha = 54.7356 deg; tan(gamma) = x/y = 1 -> gamma = 45 deg.
    const r = tiltsForBeam(cubic, 'rotation', [1, 1, 1]);
    expect(r[0].primary_deg).toBeCloseTo(54.73561, 4);
    expect(r[0].secondary_deg).toBeCloseTo(45, 9);
    expect(r[1].primary_deg).toBeCloseTo(-54.73561, 4);
    expect(r[1].secondary_deg).toBeCloseTo(-135, 9);
    // [011]: tilting the primary axis [100] by +45 deg brings it onto the beam (y = z), beta = 0.
    const [u] = tiltsForBeam(cubic, 'double', [0, 1, 1]);
    expect(u.primary_deg).toBeCloseTo(45, 9);
    expect(u.secondary_deg).toBeCloseTo(0, 9);
  });

  it('reachableTilts respects the ranges: [111] (54.7 deg off the normal) is out of a +-30 holder, [112] is in', () => {
    const h = { kind: 'double' as const, primary_deg: [-30, 30] as const, secondary_deg: [-30, 30] as const };
    expect(reachableTilts(cubic, h, [1, 1, 1])).toEqual([]);
    // by hand for [112]: alpha = asin(1/sqrt(6)) = 24.09 deg, beta = atan2(-1, 2) = -26.57 deg
    const [t] = reachableTilts(cubic, h, [1, 1, 2]);
    expect(t.primary_deg).toBeCloseTo(24.0948, 3);
    expect(t.secondary_deg).toBeCloseTo(-26.5651, 3);
  });
});

describe('orientation from the beam direction at given tilts', () => {
  it('recovers the zero-tilt orientation (round trip to 1e-9) for both holders', () => {
    const o = orientation([1, 1, 2], [1, -1, 0]);
    for (const kind of ['double', 'rotation'] as const) {
      for (const [a, b] of [[12, -7], [-25, 28], [3, 150]]) {
        const t = { primary_deg: a, secondary_deg: b };
        const beam = beamAtTilts(o, kind, t);
        // the crystal direction lying along the primary tilt axis at these tilts, by the independent rotation above:
        // rotated specimen axes e_i' give lab X components (e_i' . X); the crystal vector along X is sum_i (e_i'.X) o_i
        const m = beamByRotatingSpecimenAxes(kind, a, b);
        const axisNow: Vec3 = [0, 1, 2].map((k) => m[0][0] * o.X[k] + m[1][0] * o.Y[k] + m[2][0] * o.Z[k]) as unknown as Vec3;
        const back = orientationFromBeam(kind, t, beam, axisNow);
        for (const [p, q] of [[back.X, o.X], [back.Y, o.Y], [back.Z, o.Z]]) for (let k = 0; k < 3; k++) expect(Math.abs(p[k] - q[k])).toBeLessThan(1e-9);
      }
    }
  });

  it('by hand: on [011] at alpha = 45, beta = 0 with [100] on the axis, the zero-tilt normal is [001]', () => {
    const s = Math.SQRT1_2;
    const o = orientationFromBeam('double', { primary_deg: 45, secondary_deg: 0 }, [0, s, s], [1, 0, 0]);
    expect(o.Z[0]).toBeCloseTo(0, 12);
    expect(o.Z[1]).toBeCloseTo(0, 12);
    expect(o.Z[2]).toBeCloseTo(1, 12);
  });
});

/** Rotated specimen axes (rows: the three zero-tilt frame axes after the tilts, in lab coordinates), via Rodrigues. */
function beamByRotatingSpecimenAxes(kind: HolderKind, a_deg: number, b_deg: number): Vec3[] {
  const X: Vec3 = [1, 0, 0];
  const second0: Vec3 = kind === 'double' ? [0, 1, 0] : [0, 0, 1];
  const carried = rodrigues(second0, X, a_deg * DEG);
  return ([[1, 0, 0], [0, 1, 0], [0, 0, 1]] as Vec3[]).map((e) => rodrigues(rodrigues(e, X, a_deg * DEG), carried, b_deg * DEG));
}
