// Pieces shared by the benchmarks in bench/ (never a timed test).

/**
 * The benchmarks' reference case: one inclined mixed dislocation 1/2[1 0 1] along [1 1 2], mid-depth in a
 * 100 nm Cu foil, g 200 at w 0.5, beam along the foil normal [0 0 1]. Raw scenario JSON, infinite medium (the
 * shared-column path the bench rows were set for; relaxed surfaces, the default, are bench/surfaces.mjs' subject).
 */
export function inclinedDislocation({ name = 'bench', size = 256, pixel_nm = 0.5 } = {}) {
  return {
    name,
    material: 'Cu',
    kV: 200,
    foil: { thickness_nm: 100, normal: [0, 0, 1] },
    beam: [0, 0, 1],
    imageX: [1, 0, 0],
    surfaces: 'infinite',
    image: { width_px: size, height_px: size, pixel_nm },
    conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
    defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 50] }],
  };
}

/**
 * The benchmarks' end-on case: a screw 1/2[1 1 0] normal to a 60 nm (1 1 0) Cu foil, isotropic, seen with the
 * beam tilted to [5 5 1], g 1-11 at w 0.5, 128 x 128 pixels of 0.5 nm. Raw scenario JSON (infinite surfaces).
 */
export function normalScrew() {
  return {
    name: 'bench-normal',
    material: 'Cu',
    kV: 200,
    elasticity: 'isotropic',
    surfaces: 'infinite',
    foil: { thickness_nm: 60, normal: [1, 1, 0] },
    beam: [1, 1, 0],
    imageX: [0, 0, 1],
    image: { width_px: 128, height_px: 128, pixel_nm: 0.5 },
    conditions: [{ id: 'g', g: [1, -1, 1], w: 0.5, beam: [5, 5, 1] }],
    defects: [{ type: 'dislocation', b: '1/2[1 1 0]', line: [1, 1, 0], point_nm: [0, 0, 30] }],
  };
}

/** Median of a list of numbers. */
export const median = (a) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)];

export const fmt = (x) => x.toPrecision(3);

/** A reproducible uniform generator on [0, 1) (linear congruential). */
export function lcg(seed = 12345) {
  let s = seed;
  return () => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
}

/**
 * CPU nanoseconds per call of the directional derivative g.(grad R).k of a displacement field, over n calls
 * cycling through the 4096 points of pts (x, y, z flat), after a warm-up of 200000 calls.
 */
export function perPointNs(field, g, k, pts, n) {
  const d = field.directional(g, k);
  let s = 0;
  for (let i = 0; i < 200000; i++) { const j = 3 * (i & 4095); s += d(pts[j], pts[j + 1], pts[j + 2]); }
  const c0 = process.cpuUsage();
  for (let i = 0; i < n; i++) { const j = 3 * (i & 4095); s += d(pts[j], pts[j + 1], pts[j + 2]); }
  const c = process.cpuUsage(c0);
  return { ns: ((c.user + c.system) * 1e3) / n, s };
}
