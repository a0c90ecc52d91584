/**
 * The blind benchmark's micrograph generator (scripts/blind_micrographs.py,
 * numpy + scipy + gemmi, independent of thinfoil: its own RK4 column
 * integrator, its own Hirth & Lothe field and frames) checked before its
 * micrographs are trusted:
 *  - perfect crystal without absorption against the Pendelloesung closed form
 *    (Hirsch et al. 1965; physics.md section 3);
 *  - perfect crystal with absorption against thinfoil's exact slab transfer
 *    matrix (a different method: closed-form matrix exponential);
 *  - its analytic beta' against finite differences of its own g.R, and g.R
 *    round a circuit right-handed about u equal to g.b (FS/RH, Hirth & Lothe 1982);
 *  - its extinction distances against thinfoil's (same published tables:
 *    International Tables Vol. C 4.3.2.2 via gemmi on the Python side);
 *  - one dislocation image under a tilted two-beam condition against
 *    `render` with the same parameters (isotropic elasticity), outside the
 *    core.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { needPython, pythonText } from '../python.js';
import { parseScenario } from '../../src/scenario/parse.js';
import { background, renderJob, renderScenario } from '../../src/imaging/renderScenario.js';
import { resolveCondition } from '../../src/imaging/resolveCondition.js';
import { createRenderPool } from '../../src/imaging/workerPool.js';

const py = needPython('numpy', 'scipy', 'gemmi');
const SCRIPT = join(import.meta.dirname, '..', '..', 'scripts', 'blind_micrographs.py');
const ask = <T>(req: unknown): T => JSON.parse(pythonText([SCRIPT, '--check'], req)) as T;

/** A tilted two-beam condition in an invented copper foil with normal [1 1 2] (as in the benchmark). */
const RAW = {
  name: 'generator check',
  material: 'Cu',
  kV: 200,
  foil: { thickness_nm: 95, normal: [1, 1, 2] },
  beam: [1, 1, 2],
  imageX: [1, -1, 0],
  image: { width_px: 48, height_px: 40, pixel_nm: 1.2 },
  absorption: 0.1,
  elasticity: 'isotropic',
  surfaces: 'infinite', // the generator's field has no free surfaces
  conditions: [{ id: 'g1m11', g: [1, -1, 1], w: 0.6, beam: [0, 1, 1] }],
  defects: [{ type: 'dislocation', b: '1/2[1 0 -1]', line: [2, -1, 1], point_nm: [3, -2, 40] }],
};

describe('scripts/blind_micrographs.py (independent generator of the blind benchmark)', () => {
  it('perfect crystal, no absorption: RK4 column equals the Pendelloesung formula (Hirsch et al. 1965) to 1e-6', (ctx) => {
    py.require(ctx);
    const xi = 42.8;
    for (const s of [0, 0.01, -0.02]) {
      const r = ask<{ results: { thickness_nm: number; bf: number; df: number }[] }>({ mode: 'column', thickness_nm: [20, 50, 100, 137], s_per_nm: s, xi_nm: xi, xiAbs_nm: 1e15, xiAbs0_nm: 1e15 });
      for (const { thickness_nm: t, bf, df } of r.results) {
        const se = Math.sqrt(s * s + 1 / (xi * xi));
        const ig = Math.sin(Math.PI * t * se) ** 2 / (xi * se) ** 2;
        expect(Math.abs(df - ig)).toBeLessThan(1e-6);
        expect(Math.abs(bf - (1 - ig))).toBeLessThan(1e-6);
      }
    }
  });

  it("perfect crystal with absorption: equals thinfoil's slab transfer matrices to 1e-6 (tilted beam, column t / cos)", (ctx) => {
    py.require(ctx);
    for (const w of [-0.5, 0, 0.6, 1.2]) {
      const sc = parseScenario({ ...RAW, conditions: [{ ...RAW.conditions[0], w }], defects: [] });
      const c = resolveCondition(sc, sc.conditions[0]);
      const bg = background(renderJob(sc, c));
      const r = ask<{ results: { bf: number; df: number }[] }>({ mode: 'column', thickness_nm: [c.frame.columnLength_nm], s_per_nm: c.s_per_nm, xi_nm: c.xi_nm, xiAbs_nm: c.xiAbs_nm, xiAbs0_nm: c.xiAbs0_nm });
      expect(Math.abs(r.results[0].bf - bg.bf)).toBeLessThan(1e-6);
      expect(Math.abs(r.results[0].df - bg.df)).toBeLessThan(1e-6);
    }
  });

  it('field: analytic beta equals finite differences (1e-6 relative); g.R closes to g.b round a right-handed circuit (FS/RH, Hirth & Lothe 1982)', (ctx) => {
    py.require(ctx);
    const r = ask<{ fd: number[]; analytic: number[]; circuit: number; gb: number }>({
      mode: 'field',
      P: [0, 0, 50],
      b: [0.5, 0, 0.5],
      line: [1, 2, 2],
      g: [1, 1, 1],
      beam: [-1, -1, 2],
      points: [[3, 1, 52], [-2, 4, 47], [1, -3, 60], [5, 5, 55], [0.4, -0.3, 50.2]],
    });
    r.fd.forEach((f, i) => expect(Math.abs(f - r.analytic[i])).toBeLessThan(1e-6 * Math.max(1, Math.abs(f))));
    expect(r.gb).toBeCloseTo(1, 12);
    expect(r.circuit).toBeCloseTo(r.gb, 9);
  });

  it("extinction distances equal thinfoil's (same tables: IT Vol. C 4.3.2.2, B = 0.55 A^2) to 1e-6", (ctx) => {
    py.require(ctx);
    const hkl = [[2, 0, 0], [1, 1, -1], [2, -2, 0], [3, -1, -1], [0, 2, -2]];
    const beams = [[0, 1, 1], [1, 1, 2], [1, 1, 2], [1, 1, 2], [1, 1, 1]];
    const r = ask<{ xi_nm: number[] }>({ mode: 'xi', hkl });
    hkl.forEach((g, i) => {
      const sc = parseScenario({ ...RAW, conditions: [{ id: 'x', g, w: 0, beam: beams[i] }], defects: [] });
      expect(Math.abs(r.xi_nm[i] / resolveCondition(sc, sc.conditions[0]).xi_nm - 1)).toBeLessThan(1e-6);
    });
  });

  it('one dislocation image (beam [0 1 1] tilted 30 degrees from the foil normal) agrees with `render` within 0.002 of the incident intensity (2 % of its contrast) outside 3 nm of the line; -b does not', async (ctx) => {
    py.require(ctx);
    const sc = parseScenario(RAW);
    const pool = createRenderPool(1);
    const [ci] = await renderScenario(sc, pool);
    await pool.close();
    const c = ci.condition;
    const spec = {
      width: RAW.image.width_px,
      height: RAW.image.height_px,
      pixel_nm: RAW.image.pixel_nm,
      shift_nm: [0, 0],
      a_nm: sc.material.lattice.a_nm,
      beam: RAW.conditions[0].beam,
      imageX: RAW.imageX,
      rot_deg: 0,
      normal: RAW.foil.normal,
      thickness_nm: RAW.foil.thickness_nm,
      refBeam: RAW.beam,
      point_nm: RAW.defects[0].point_nm,
      b: [0.5, 0, -0.5],
      line: RAW.defects[0].line,
      g: RAW.conditions[0].g,
      s_per_nm: c.s_per_nm,
      xi_nm: c.xi_nm,
      xiAbs_nm: c.xiAbs_nm,
      xiAbs0_nm: c.xiAbs0_nm,
      nu: sc.material.elastic.poissonRatio,
    };
    // the step the benchmark's micrographs were made with (0.2 nm)
    const r = ask<{ bf: number[]; df: number[] }>({ mode: 'image', spec, step_nm: 0.2 });
    // the same with -b: the image moves to the other side of the line, so the comparison can tell
    const flipped = ask<{ bf: number[]; df: number[] }>({ mode: 'image', spec: { ...spec, b: [-0.5, 0, 0.5] }, step_nm: 0.2 });
    // distance of each pixel from the projected line: from the generator's and thinfoil's common geometry,
    // taken here from thinfoil's core mask grown by 3 nm (pixels whose area reaches 2 core radii, then a margin)
    const W = spec.width;
    const H = spec.height;
    const grow = Math.ceil(3 / spec.pixel_nm);
    const near = new Uint8Array(W * H);
    for (let j = 0; j < H; j++) for (let i = 0; i < W; i++) if (ci.coreMask[j * W + i]) for (let dj = -grow; dj <= grow; dj++) for (let di = -grow; di <= grow; di++) {
      const y = j + dj;
      const x = i + di;
      if (x >= 0 && x < W && y >= 0 && y < H) near[y * W + x] = 1;
    }
    let worst = 0;
    let worstFlipped = 0;
    let compared = 0;
    let contrast = 0;
    for (let k = 0; k < W * H; k++) {
      if (near[k]) continue;
      compared++;
      worst = Math.max(worst, Math.abs(r.bf[k] - ci.bf[k]), Math.abs(r.df[k] - ci.df[k]));
      worstFlipped = Math.max(worstFlipped, Math.abs(flipped.bf[k] - ci.bf[k]), Math.abs(flipped.df[k] - ci.df[k]));
      contrast = Math.max(contrast, Math.abs(ci.bf[k] - ci.background.bf));
    }
    // the image has contrast to compare (the line crosses the field), and most pixels are compared
    expect(contrast).toBeGreaterThan(0.05);
    expect(compared).toBeGreaterThan(0.6 * W * H);
    expect(worst).toBeLessThan(0.002);
    expect(worstFlipped).toBeGreaterThan(0.02);
  });
});
