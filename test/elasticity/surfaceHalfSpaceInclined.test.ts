import { describe, expect, it } from 'vitest';
import { azimuthNodes } from '../../src/elasticity/surfaceHalfSpaceInclined.js';
import { rng } from './helpers.js';

// The hot path of the inclined-line correction locates a direction's azimuth without Math.atan2 (octant
// reduction, a table of atan(j/64) and the arctangent series; surfaceHalfSpaceInclined.ts). Reference: the
// platform's Math.atan2 (ECMAScript; V8 takes it from fdlibm, correctly rounded to about 1 ulp).
describe('azimuth of the inclined-line tables without Math.atan2', () => {
  const S_AZ = 512; // nodes of the scalar grid's azimuth (surfaceHalfSpaceInclined.ts)
  const reference = (X: number, Y: number): number => {
    let ph = Math.atan2(Y, X);
    if (ph < 0) ph += 2 * Math.PI;
    return (ph * S_AZ) / (2 * Math.PI);
  };
  it('equals atan2 (in grid steps, on [0, 512]) to 1e-12 over random points of every octant and scale', () => {
    const rnd = rng(5);
    let worst = 0;
    for (let i = 0; i < 200000; i++) {
      const X = (2 * rnd() - 1) * 10 ** (8 * rnd() - 4);
      const Y = (2 * rnd() - 1) * 10 ** (8 * rnd() - 4);
      worst = Math.max(worst, Math.abs(azimuthNodes(X, Y) - reference(X, Y)));
    }
    expect(worst).toBeLessThan(1e-12);
  });
  it('on the axes, the diagonals, the octant boundaries and nodes of the reduction table (j/64)', () => {
    const pts: [number, number][] = [[1, 0], [0, 1], [-1, 0], [0, -1], [1, 1], [-1, 1], [-1, -1], [1, -1], [3, 3 + 1e-15], [3 + 1e-15, 3]];
    for (let j = 0; j <= 64; j++) for (const [sx, sy] of [[1, 1], [-1, 1], [-1, -1], [1, -1]]) {
      pts.push([sx * 64, sy * j], [sx * j, sy * 64], [sx * 64, sy * (j + 0.5)]);
    }
    for (const [X, Y] of pts) expect(Math.abs(azimuthNodes(X, Y) - reference(X, Y))).toBeLessThan(1e-12);
    // signed zeros and the origin: atan2(-0, x > 0) = -0, azimuth 0; the origin gets 0 (its value is the same for all azimuths)
    expect(azimuthNodes(1, -0)).toBe(0);
    expect(azimuthNodes(0, 0)).toBe(0);
    // just below the positive X axis: close to a full turn (the caller wraps 512 to 0)
    expect(azimuthNodes(1, -1e-300)).toBeGreaterThan(511.999);
    expect(azimuthNodes(1, -1e-300)).toBeLessThanOrEqual(512);
  });
});
