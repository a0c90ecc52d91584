/**
 * Synthetic "micrographs" for demonstrations and tests: a simulation of a
 * hidden candidate made to look like a recorded image. Per condition:
 * rendered with g at the requested screen angle plus a random small
 * rotation, sampled with a random shift (and optional scale error) onto the
 * micrograph's pixels (each pixel averaging oversample x oversample points),
 * blurred by a Gaussian point spread, multiplied by an illumination
 * gradient, and given noise. Everything random comes from one seed.
 *
 * Signal-to-noise: snr = C_max / sigma_rel, where C_max is the largest
 * |I / I_background - 1| over all images of the set (after blur) and
 * sigma_rel the noise standard deviation relative to the background, the
 * same in every image (the same dose). A defect that is invisible in one
 * image therefore stays buried in that image's noise. Poisson noise: the
 * background holds 1 / sigma_rel^2 counts; Gaussian noise: the background
 * is 1000 grey levels.
 *
 * These are NOT measurements: every consumer must label them synthetic
 * (file names start with "synthetic-").
 */
import type { Scenario } from '../scenario/types.js';
import { variantScenario, type Candidate } from './candidates.js';
import type { Renderer } from './identify.js';
import { conditionView, simulatedGAngle_deg } from './identifyView.js';
import { seededRandom } from './identifyRandom.js';
import { bilinear, gaussianBlur } from './preprocess.js';

export interface SyntheticSpec {
  readonly conditionId: string;
  readonly field: 'bf' | 'df';
  /** Direction of g in the synthetic micrograph (screen degrees, counter-clockwise from +x); default as in the scenario's simulation. */
  readonly gAngle_deg?: number;
  readonly mirrored?: boolean;
}

export interface SyntheticOptions {
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  readonly snr: number;
  readonly noise?: 'poisson' | 'gaussian';
  /** Gaussian point spread, standard deviation in nm (default 0). */
  readonly blur_nm?: number;
  /** Relative change of the illumination across the half-diagonal (default 0.1). */
  readonly gradient?: number;
  /** Random shift up to this in x and in y (default 10 % of the smaller side). */
  readonly maxShift_nm?: number;
  /** Random rotation up to +- this (default 2 degrees). */
  readonly maxRotation_deg?: number;
  /** Random scale error up to +- this (default 0). */
  readonly maxScale?: number;
  /** Sub-samples per pixel and axis (default 2). */
  readonly oversample?: number;
  readonly seed: number;
}

export interface SyntheticMicrograph {
  readonly conditionId: string;
  readonly field: 'bf' | 'df';
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  /** Linear intensity (counts or grey levels), row by row, top row first. */
  readonly data: Float32Array;
  readonly synthetic: true;
  /** What was hidden in it, for checking an identification. */
  readonly truth: {
    readonly candidate: string;
    readonly gAngle_deg: number;
    readonly shift_nm: readonly [number, number];
    readonly rotation_deg: number;
    readonly scale: number;
    readonly noiseRelative: number;
    readonly backgroundLevel: number;
  };
}

/** File name for a synthetic micrograph: always starts with "synthetic-". */
export function syntheticFileName(conditionId: string, field: 'bf' | 'df', ext = 'tif'): string {
  return `synthetic-${conditionId}-${field}.${ext}`;
}

/** True for a file name that marks a synthetic micrograph. */
export function isSyntheticName(path: string): boolean {
  const base = path.split(/[\\/]/).pop() ?? path;
  return base.startsWith('synthetic-');
}

export async function syntheticMicrographs(
  sc: Scenario,
  hidden: Candidate | null,
  specs: readonly SyntheticSpec[],
  opts: SyntheticOptions,
  render: Renderer,
): Promise<SyntheticMicrograph[]> {
  const { width: w, height: h, pixel_nm: p } = opts;
  if (!(opts.snr > 0)) throw new RangeError(`syntheticMicrographs: snr must be > 0, got ${opts.snr}`);
  const truthSc = hidden ? variantScenario(sc, hidden) : sc;
  const label = hidden ? hidden.label : sc.defects.map((d) => d.label).join(' + ') || 'perfect crystal';
  const rnd = seededRandom(opts.seed);
  const os = Math.max(1, Math.round(opts.oversample ?? 2));
  const maxShift = opts.maxShift_nm ?? 0.1 * Math.min(w, h) * p;
  const maxRot = opts.maxRotation_deg ?? 2;
  const maxScale = opts.maxScale ?? 0;
  const gradient = opts.gradient ?? 0.1;

  const rel: { data: Float64Array; truth: SyntheticMicrograph['truth']; spec: SyntheticSpec; ramp: Float64Array }[] = [];
  for (const spec of specs) {
    const cond = truthSc.conditions.find((c) => c.id === spec.conditionId);
    if (!cond) throw new RangeError(`syntheticMicrographs: no condition "${spec.conditionId}"`);
    const gAngle = spec.gAngle_deg ?? simulatedGAngle_deg(truthSc, cond);
    const rotation = (2 * rnd.uniform() - 1) * maxRot;
    const scale = 1 + (2 * rnd.uniform() - 1) * maxScale;
    const shift: [number, number] = [(2 * rnd.uniform() - 1) * maxShift, (2 * rnd.uniform() - 1) * maxShift];
    const ramp = rnd.uniform() * 2 * Math.PI;
    // fine canvas covering the field after shift, rotation and scale
    const pf = p / os;
    const reach = (Math.hypot(w, h) * p) / 2 / Math.min(1, scale) + Math.hypot(shift[0], shift[1]) + 2 * p;
    const side = 2 * Math.ceil(reach / pf) + 2;
    const angle = (gAngle + rotation) * (spec.mirrored ? -1 : 1);
    const imgs = await render(conditionView(truthSc, cond, angle, side, side, pf));
    const ci = imgs[0];
    const src = spec.field === 'bf' ? ci.bf : ci.df;
    const bg = ci.background[spec.field];
    const data = new Float64Array(w * h);
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        let acc = 0;
        for (let j = 0; j < os; j++) {
          for (let i = 0; i < os; i++) {
            // position in the micrograph (nm from its centre, +y down), then in the simulation
            const X = (x + (i + 0.5) / os - w / 2) * p;
            const Y = (y + (j + 0.5) / os - h / 2) * p;
            const sx = (X - shift[0]) / scale;
            let sy = (Y - shift[1]) / scale;
            if (spec.mirrored) sy = -sy;
            acc += bilinear(src, side, side, sx / pf + side / 2 - 0.5, sy / pf + side / 2 - 0.5);
          }
        }
        data[y * w + x] = acc / (os * os) / bg - 1;
      }
    }
    const blurred = gaussianBlur(new Float64Array(w * h), data, w, h, (opts.blur_nm ?? 0) / p);
    const rampImg = new Float64Array(w * h);
    const half = Math.hypot(w, h) / 2;
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        rampImg[y * w + x] = 1 + (gradient * ((x + 0.5 - w / 2) * Math.cos(ramp) + (y + 0.5 - h / 2) * Math.sin(ramp))) / half;
      }
    }
    rel.push({
      data: blurred,
      spec,
      ramp: rampImg,
      truth: { candidate: label, gAngle_deg: gAngle, shift_nm: shift, rotation_deg: rotation, scale, noiseRelative: 0, backgroundLevel: 0 },
    });
  }

  let cMax = 0;
  for (const r of rel) for (const v of r.data) cMax = Math.max(cMax, Math.abs(v));
  // a set with no contrast at all: noise relative to a nominal 10 % contrast
  const sigmaRel = (cMax > 0 ? cMax : 0.1) / opts.snr;
  const poisson = (opts.noise ?? 'poisson') === 'poisson';
  const level = poisson ? 1 / (sigmaRel * sigmaRel) : 1000;
  return rel.map((r) => {
    const out = new Float32Array(w * h);
    for (let k = 0; k < out.length; k++) {
      const mean = level * (1 + r.data[k]) * r.ramp[k];
      out[k] = poisson ? rnd.poisson(Math.max(0, mean)) : mean + level * sigmaRel * r.ramp[k] * rnd.normal();
    }
    return {
      conditionId: r.spec.conditionId,
      field: r.spec.field,
      width: w,
      height: h,
      pixel_nm: p,
      data: out,
      synthetic: true as const,
      truth: { ...r.truth, noiseRelative: sigmaRel, backgroundLevel: level },
    };
  });
}
