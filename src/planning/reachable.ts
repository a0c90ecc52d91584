/**
 * Two-beam conditions that the holder can reach: low-index zone axes within
 * the tilt ranges, and for every allowed reflection g of such a zone (up to a
 * chosen |g|) the orientation that excites g alone, a few degrees off the zone
 * (common practice: tilt away from the zone about g itself, so that g stays
 * at the Bragg angle while the other reflections of the zone drop away).
 *
 * The two-beam beam direction for g from zone z (unit Cartesian vectors):
 *   b = cos(thetaB) (cos(delta) z + sin(delta) e) - sin(thetaB) g^,  e = z x g^,
 * which keeps g at the exact Bragg angle (k.g = -g^2/2 with abs(k) = 1/lambda, i.e. s = 0;
 * the chosen w changes the angle by far less than a degree) with delta the
 * tilt off the zone (either sense; the one within range needing least tilt
 * is kept). Every g is kept once per +-g pair, from the zone that needs the
 * least tilting from the current orientation.
 */
import type { Vec3 } from '../math/vec3.js';
import { cross, dot, unit } from '../math/vec3.js';
import type { Material } from '../crystal/material.js';
import { directionToCartesian, planeNormalToCartesian, gLength_per_nm } from '../crystal/lattice.js';
import { primitiveDirections } from '../crystal/formatIndices.js';
import { isForbidden, reflectionParameters } from '../scattering/reflection.js';
import type { AbsorptionSetting } from '../scattering/absorption.js';
import { type Holder, type Orientation, type Tilts, beamAtTilts, reachableTilts, tiltBetween_deg } from './holder.js';

export interface ReachableZone {
  readonly zone: Vec3;
  readonly tilts: Tilts;
  /** Angle from the current beam direction, degrees. */
  readonly fromCurrent_deg: number;
}

export interface ReachableCondition {
  readonly g: Vec3;
  readonly g_per_nm: number;
  readonly xi_nm: number;
  readonly zone: Vec3;
  readonly zoneTilts: Tilts;
  /** Beam direction of the two-beam condition (Cartesian unit vector, crystal frame). */
  readonly beam_cart: Vec3;
  readonly tilts: Tilts;
  readonly fromCurrent_deg: number;
}

export interface ReachOptions {
  /** Largest |g| in nm^-1. */
  readonly gMax_per_nm: number;
  /** Largest index of a zone axis [uvw]. */
  readonly zoneIndexMax: number;
  /** Tilt off the zone for the two-beam condition, degrees. */
  readonly offZone_deg: number;
  readonly kV: number;
  readonly absorption: AbsorptionSetting;
}

/** Zone axes [uvw] (primitive, |u|,|v|,|w| <= n) reachable with the holder, nearest to the current beam first. */
export function reachableZones(material: Material, o: Orientation, h: Holder, current: Tilts, n: number): ReachableZone[] {
  const l = material.lattice;
  const here = beamAtTilts(o, h.kind, current);
  const out: ReachableZone[] = [];
  for (const z of primitiveDirections(n)) {
    const c = directionToCartesian(l, z);
    if (dot(c, o.Z) <= 0) continue; // each zone once, with the beam entering the foil's entrance side
    const t = reachableTilts(o, h, c);
    if (t.length === 0) continue;
    out.push({ zone: z, tilts: t[0], fromCurrent_deg: tiltBetween_deg(here, c) });
  }
  return out.sort((a, b) => a.fromCurrent_deg - b.fromCurrent_deg || zoneIndexSum(a.zone) - zoneIndexSum(b.zone));
}

const zoneIndexSum = (z: Vec3) => Math.abs(z[0]) + Math.abs(z[1]) + Math.abs(z[2]);

/** The reachable two-beam conditions, one per +-g pair, ordered by |g| then tilt. */
export function reachableConditions(material: Material, o: Orientation, h: Holder, current: Tilts, opt: ReachOptions): ReachableCondition[] {
  const l = material.lattice;
  const here = beamAtTilts(o, h.kind, current);
  const zones = reachableZones(material, o, h, current, opt.zoneIndexMax);
  const H = Math.ceil(opt.gMax_per_nm * Math.max(l.a_nm, l.b_nm, l.c_nm)) + 1;
  const best = new Map<string, ReachableCondition>();
  const delta = (opt.offZone_deg * Math.PI) / 180;
  for (const zr of zones) {
    const zc = unit(directionToCartesian(l, zr.zone));
    for (let a = -H; a <= H; a++) {
      for (let b = -H; b <= H; b++) {
        for (let c = -H; c <= H; c++) {
          if (a === 0 && b === 0 && c === 0) continue;
          if (a * zr.zone[0] + b * zr.zone[1] + c * zr.zone[2] !== 0) continue; // Weiss zone law
          const g: Vec3 = [a, b, c];
          const gl = gLength_per_nm(l, g);
          if (gl > opt.gMax_per_nm * (1 + 1e-12)) continue;
          // one of +-g: the first nonzero index positive
          const first = a !== 0 ? a : b !== 0 ? b : c;
          if (first < 0) continue;
          if (isForbidden(material, g)) continue;
          const key = `${a},${b},${c}`;
          const gh = unit(planeNormalToCartesian(l, g));
          const e = unit(cross(zc, gh));
          const r = reflectionParameters(material, g, opt.kV, { absorption: opt.absorption });
          const cb = Math.cos(r.braggAngle_rad), sb = Math.sin(r.braggAngle_rad);
          for (const sgn of [1, -1]) {
            const cd = Math.cos(delta), sd = sgn * Math.sin(delta);
            const beam: Vec3 = [0, 1, 2].map((i) => cb * (cd * zc[i] + sd * e[i]) - sb * gh[i]) as unknown as Vec3;
            const t = reachableTilts(o, h, beam);
            if (t.length === 0) continue;
            const from = tiltBetween_deg(here, beam);
            const prev = best.get(key);
            if (prev !== undefined && prev.fromCurrent_deg <= from) continue;
            best.set(key, { g, g_per_nm: gl, xi_nm: r.xi_nm, zone: zr.zone, zoneTilts: zr.tilts, beam_cart: beam, tilts: t[0], fromCurrent_deg: from });
          }
        }
      }
    }
  }
  return [...best.values()].sort((p, q) => p.g_per_nm - q.g_per_nm || p.fromCurrent_deg - q.fromCurrent_deg);
}
