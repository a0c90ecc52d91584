/**
 * The two-beam column integrator (Simpson samples of beta', twoBeamColumn.ts)
 * on the renderer's own columns, against references that do not share its
 * sampling:
 * - the previous integrator (Gauss-Legendre samples, twoBeamColumnGauss.ts)
 *   run at tolerance 1e-8, i.e. about 1e-8 from the exact column: the
 *   difference is then the new integrator's own error, which must stay within
 *   its tolerance 1e-4 (intensity);
 * - classical fourth-order Runge-Kutta with fixed steps of 0.005 nm
 *   (rk4Reference.ts; Hairer, Norsett & Wanner, Solving ODEs I, II.1) on
 *   columns without phase steps;
 * - the previous integrator at the same tolerance 1e-4 (the images change by
 *   less than the tolerance).
 * Geometries: an inclined dislocation (anisotropic Cu) including pixels whose
 * columns pass within a fraction of a nanometre of the line, a faulted Frank
 * loop and a small prismatic loop, an inclined stacking fault, a dissociated
 * dislocation (fault ribbon), a coherent inclusion, and the inclined line with
 * relaxed foil surfaces.
 */
import { describe, expect, it } from 'vitest';
import { scenario } from './helpers.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { renderJob } from '../../src/imaging/renderScenario.js';
import { columnEvaluator, type RenderJob } from '../../src/imaging/renderRows.js';
import { pixelX } from '../../src/geometry/frames.js';

const TOL = 1e-4;

function jobOf(over: Record<string, unknown>): RenderJob {
  // the infinite medium unless a case says otherwise (the numbers below were measured so; the relaxed line is a case)
  const sc = scenario({ surfaces: 'infinite', ...over });
  return { ...renderJob(sc, resolveCondition(sc, sc.conditions[0]), TOL), shareColumns: false };
}

/** Column entry points: a grid over the image plus, when given, points at small distances across a line through the origin. */
function points(job: RenderJob, grid: number, across?: [number, number]): [number, number][] {
  const pts: [number, number][] = [];
  for (let j = 0; j < grid; j++) {
    for (let i = 0; i < grid; i++) {
      const x = pixelX(Math.floor(((i + 0.5) * job.width) / grid), job.width, job.pixel_nm);
      const y = pixelX(Math.floor(((j + 0.5) * job.height) / grid), job.height, job.pixel_nm);
      pts.push([x, y]);
    }
  }
  if (across !== undefined) {
    // the normal to the projected line (across[0], across[1]) through the image centre
    const n = Math.hypot(across[0], across[1]);
    const nx = -across[1] / n;
    const ny = across[0] / n;
    for (const d of [-3, -1, -0.5, -0.2, -0.05, 0.05, 0.2, 0.5, 1, 3]) pts.push([d * nx, d * ny]);
  }
  return pts;
}

/** Largest intensity difference (bright or dark field) between two evaluators over the points. */
function worstDiff(a: RenderJob, b: RenderJob, pts: [number, number][]): number {
  const ea = columnEvaluator(a);
  const eb = columnEvaluator(b);
  const u = new Float64Array(4);
  const v = new Float64Array(4);
  let m = 0;
  for (const [x, y] of pts) {
    ea.column(u, x, y);
    eb.column(v, x, y);
    m = Math.max(m, Math.abs(u[0] ** 2 + u[1] ** 2 - v[0] ** 2 - v[1] ** 2), Math.abs(u[2] ** 2 + u[3] ** 2 - v[2] ** 2 - v[3] ** 2));
  }
  return m;
}

const inclined = {
  elasticity: 'anisotropic',
  image: { width_px: 64, height_px: 64, pixel_nm: 1 },
  conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.5 }],
  defects: [{ type: 'dislocation', b: '1/2[1 0 1]', line: [1, 1, 2], point_nm: [0, 0, 50] }],
};

const cases: { name: string; over: Record<string, unknown>; grid: number; across?: [number, number] }[] = [
  // the projected line of [1 1 2] seen along [0 0 1] runs along (1, 1) in the image
  { name: 'inclined dislocation, with columns 0.05-3 nm from the line', over: inclined, grid: 14, across: [1, 1] },
  {
    name: 'faulted Frank loop and a small prismatic loop near the entrance surface',
    over: {
      image: { width_px: 48, height_px: 48, pixel_nm: 1 },
      conditions: [{ id: 'g220', g: [2, 2, 0], w: 0.3 }],
      defects: [
        { type: 'loop', b: '1/3[1 1 1]', normal: [1, 1, 1], centre_nm: [-8, 0, 50], vertices_nm: [[6, 0], [3, 5.2], [-3, 5.2], [-6, 0], [-3, -5.2], [3, -5.2]], fault: 'intrinsic' },
        { type: 'loop', b: '1/2[1 1 0]', normal: [1, 1, 0], centre_nm: [12, 6, 6], radius_nm: 2 },
      ],
    },
    grid: 16,
  },
  {
    name: 'inclined stacking fault (no strain: exact slabs and the fault phase)',
    over: {
      beam: [0, 1, 1],
      foil: { thickness_nm: 120, normal: [0, 1, 1] },
      image: { width_px: 48, height_px: 48, pixel_nm: 4 },
      conditions: [{ id: 'c', g: [1, 1, -1], w: 0.2 }],
      defects: [{ type: 'fault', plane: [1, 1, 1], point_nm: [0, 0, 60], vector: '1/3[1 1 1]' }],
    },
    grid: 16,
  },
  {
    name: 'dissociated screw (two partials and the fault ribbon between them)',
    over: {
      image: { width_px: 48, height_px: 48, pixel_nm: 0.5 },
      conditions: [{ id: 'g2m20', g: [2, -2, 0], w: 0.3 }],
      defects: [{ type: 'dissociated', b: '1/2[1 1 0]', plane: [1, -1, 1], line: [1, 1, 0], point_nm: [0, 0, 40] }],
    },
    grid: 16,
    across: [1, 1],
  },
  {
    name: 'coherent inclusion',
    over: {
      image: { width_px: 40, height_px: 40, pixel_nm: 0.5 },
      conditions: [{ id: 'g200', g: [2, 0, 0], w: 0.3 }],
      defects: [{ type: 'inclusion', centre_nm: [0, 0, 50], radius_nm: 5, misfit: 0.02 }],
    },
    grid: 16,
  },
  { name: 'inclined dislocation with relaxed foil surfaces', over: { ...inclined, surfaces: 'relaxed' }, grid: 10, across: [1, 1] },
];

describe('two-beam column integrator on rendered geometries (tolerance 1e-4 in intensity)', () => {
  for (const c of cases) {
    it(`${c.name}: within the tolerance of the previous integrator at tol 1e-8, and of it at tol 1e-4`, () => {
      const job = jobOf(c.over);
      expect(job.manyBeam).toBeUndefined();
      const pts = points(job, c.grid, c.across);
      const tight: RenderJob = { ...job, gaussNodes: true, tol: 1e-8 };
      // claim of the integrator (twoBeamColumn.ts header): |dI| <= tol
      expect(worstDiff(job, tight, pts)).toBeLessThan(TOL);
      // the images of the previous integrator move by less than the tolerance
      expect(worstDiff(job, { ...job, gaussNodes: true }, pts)).toBeLessThan(TOL);
    });
  }

  it('inclined dislocation: within 1e-4 of fixed-step RK4 (20000 steps of 0.005 nm) on 12 columns near the line', () => {
    const job = jobOf(inclined);
    const pts = points(job, 0, [1, 1]).concat([[10, -4], [-6, 9]]);
    expect(worstDiff(job, { ...job, rk4Steps: 20000 }, pts)).toBeLessThan(TOL);
  });

  // measured: worst |dI| against the tight reference 6.8e-6 (inclined line), 3.9e-5 (loops), 2.4e-5 (ribbon),
  // 4.8e-6 (inclusion), 1.2e-5 (relaxed surfaces). With the wrong sample carried after a rejection (a bug tried on
  // purpose) the error control still met the tolerance but took 36570 samples here against the limit 22568 (the
  // test below failed), and a wrong sign of the commutator term likewise: step doubling hides such bugs in accuracy
  // and shows them in cost
  it('uses at most 70 % of the previous integrator\'s samples of beta\' on the inclined dislocation', () => {
    const job = jobOf(inclined);
    const pts = points(job, 14, [1, 1]);
    const count = (j: RenderJob): number => {
      const ev = columnEvaluator(j);
      const out = new Float64Array(4);
      for (const [x, y] of pts) ev.column(out, x, y);
      return (ev.stats as { betaCalls?: number }).betaCalls ?? 0;
    };
    const now = count(job);
    const before = count({ ...job, gaussNodes: true });
    expect(now).toBeGreaterThan(0);
    expect(now).toBeLessThan(0.7 * before);
  });
});
