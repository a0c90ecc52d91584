/**
 * Registration of a simulated image to a micrograph: the shift, a small
 * rotation and a small scale change that best overlay them, by normalised
 * cross-correlation (NCC).
 *
 * The micrograph (the "template", w x h) slides inside a larger simulated
 * image (W x H, W >= w, H >= h). For every offset (u, v) with the template
 * inside, NCC(u, v) = sum t'(p) s(p + (u,v)) / sqrt(sum t'^2 * sum_window (s - mean_window)^2)
 * with t' the zero-mean template. The numerator for all offsets at once is a
 * cross-correlation done by FFT; the window sums of s and s^2 come from
 * summed-area tables (Lewis 1995, "Fast normalized cross-correlation").
 * The integer peak is refined to sub-pixel precision by a parabola through
 * the peak and its neighbours along x and along y (common practice).
 *
 * Rotation and scale: over the small ranges allowed here (+-5 degrees,
 * +-5 %) the simulation is rotated and scaled about its centre (bilinear
 * resampling) and the NCC peak is maximised by a coarse-to-fine pattern
 * search, finished by a parabola in each parameter. (For large rotations the
 * log-polar Fourier method of Reddy & Chatterji 1996 would be the tool; over
 * a few degrees on small, noisy images a direct search is more robust.)
 *
 * Angles: counter-clockwise as seen on the screen (x right, y down).
 */
import { bilinear } from './preprocess.js';
import { fft2d, nextPow2, type Fft2d } from './registrationFft.js';

/** Default search range of the rotation (degrees, either sense) and of the relative scale change. */
export const DEFAULT_MAX_ROTATION_DEG = 5;
export const DEFAULT_MAX_SCALE = 0.05;

export interface RegistrationOptions {
  /** Largest rotation searched, degrees (default 5). */
  readonly maxRotation_deg?: number;
  /** Largest relative scale change searched (default 0.05 = 5 %). */
  readonly maxScale?: number;
  /** The search stops refining below this rotation step, degrees (default 0.25). */
  readonly rotationStep_deg?: number;
  /** The search stops refining below this scale step (default 0.0025). */
  readonly scaleStep?: number;
  /** Where the rotation / scale search starts (default 0 degrees, scale 1). */
  readonly start?: { readonly rotation_deg: number; readonly scale: number };
  /** false: only the shift is searched, rotation and scale stay at `start` (default true). */
  readonly search?: boolean;
  /** First steps of the pattern search (default half the ranges); smaller when `start` is already close. */
  readonly initialRotationStep_deg?: number;
  readonly initialScaleStep?: number;
}

export interface Registration {
  /** Peak normalised cross-correlation, -1..1. */
  readonly ncc: number;
  /** Where the simulation's content sits in the micrograph relative to the centred placement (micrograph pixels, +y down). */
  readonly shiftX_px: number;
  readonly shiftY_px: number;
  /** Rotation applied to the simulation, counter-clockwise on screen, degrees. */
  readonly rotation_deg: number;
  /** Scale applied to the simulation (1 = none). */
  readonly scale: number;
  /** Top-left of the micrograph inside the transformed simulation (pixels, sub-pixel). */
  readonly offsetX: number;
  readonly offsetY: number;
}

/** The micrograph side, prepared once: its spectrum (conjugated) and norm. */
export interface PreparedTemplate {
  readonly width: number;
  readonly height: number;
  readonly conjSpectrum: Float64Array;
  /** sqrt(sum (t - mean)^2). */
  readonly norm: number;
}

/** The simulation side: its spectrum and, per offset, sqrt(sum_window (s - mean_window)^2). */
export interface PreparedImage {
  readonly width: number;
  readonly height: number;
  readonly spectrum: Float64Array;
  readonly windowNorm: Float64Array;
}

/** FFT plan and buffers for one pair of sizes (template w x h inside image W x H). */
export interface Correlator {
  readonly templateWidth: number;
  readonly templateHeight: number;
  readonly imageWidth: number;
  readonly imageHeight: number;
  /** Size of the NCC map: (W - w + 1) x (H - h + 1). */
  readonly mapWidth: number;
  readonly mapHeight: number;
  prepareTemplate(t: ArrayLike<number>): PreparedTemplate;
  prepareImage(s: ArrayLike<number>): PreparedImage;
  /** NCC map into out (mapWidth x mapHeight). */
  ncc(img: PreparedImage, tpl: PreparedTemplate, out: Float64Array): Float64Array;
}

/**
 * minStd: a window of the simulation whose standard deviation is below this
 * (in the simulation's units) counts as flat and gets NCC 0 (default 0; a
 * relative floor of 1e-5 of the window's RMS always applies, so rounding
 * noise is never correlated).
 */
export function createCorrelator(templateWidth: number, templateHeight: number, imageWidth: number, imageHeight: number, minStd = 0): Correlator {
  if (imageWidth < templateWidth || imageHeight < templateHeight) {
    throw new RangeError(`createCorrelator: the image (${imageWidth} x ${imageHeight}) must be at least the template size (${templateWidth} x ${templateHeight})`);
  }
  const N = nextPow2(imageWidth);
  const M = nextPow2(imageHeight);
  const plan: Fft2d = fft2d(N, M);
  const mapWidth = imageWidth - templateWidth + 1;
  const mapHeight = imageHeight - templateHeight + 1;
  const work = new Float64Array(2 * N * M);
  const sat1 = new Float64Array((imageWidth + 1) * (imageHeight + 1));
  const sat2 = new Float64Array((imageWidth + 1) * (imageHeight + 1));
  const nT = templateWidth * templateHeight;

  return {
    templateWidth, templateHeight, imageWidth, imageHeight, mapWidth, mapHeight,

    prepareTemplate(t) {
      let mean = 0;
      for (let k = 0; k < nT; k++) mean += t[k];
      mean /= nT;
      const spec = new Float64Array(2 * N * M);
      let ss = 0;
      for (let y = 0; y < templateHeight; y++) {
        for (let x = 0; x < templateWidth; x++) {
          const v = t[y * templateWidth + x] - mean;
          spec[2 * (y * N + x)] = v;
          ss += v * v;
        }
      }
      plan.forwardReal(spec, templateHeight);
      for (let k = 1; k < spec.length; k += 2) spec[k] = -spec[k];
      return { width: templateWidth, height: templateHeight, conjSpectrum: spec, norm: Math.sqrt(ss) };
    },

    prepareImage(s) {
      const spec = new Float64Array(2 * N * M);
      for (let y = 0; y < imageHeight; y++) for (let x = 0; x < imageWidth; x++) spec[2 * (y * N + x)] = s[y * imageWidth + x];
      plan.forwardReal(spec, imageHeight);
      // summed-area tables of s and s^2 (Lewis 1995, section 3)
      const W1 = imageWidth + 1;
      for (let y = 0; y < imageHeight; y++) {
        let r1 = 0;
        let r2 = 0;
        for (let x = 0; x < imageWidth; x++) {
          const v = s[y * imageWidth + x];
          r1 += v;
          r2 += v * v;
          sat1[(y + 1) * W1 + x + 1] = sat1[y * W1 + x + 1] + r1;
          sat2[(y + 1) * W1 + x + 1] = sat2[y * W1 + x + 1] + r2;
        }
      }
      const windowNorm = new Float64Array(mapWidth * mapHeight);
      for (let v = 0; v < mapHeight; v++) {
        for (let u = 0; u < mapWidth; u++) {
          const a = v * W1 + u;
          const b = a + templateWidth;
          const c = (v + templateHeight) * W1 + u;
          const d = c + templateWidth;
          const s1 = sat1[d] - sat1[b] - sat1[c] + sat1[a];
          const s2 = sat2[d] - sat2[b] - sat2[c] + sat2[a];
          const q = s2 - (s1 * s1) / nT;
          // a window flat to rounding error (or below minStd) has no defined correlation
          windowNorm[v * mapWidth + u] = q > 1e-10 * s2 && q > nT * minStd * minStd && q > 0 ? Math.sqrt(q) : 0;
        }
      }
      return { width: imageWidth, height: imageHeight, spectrum: spec, windowNorm };
    },

    ncc(img, tpl, out) {
      const a = img.spectrum;
      const b = tpl.conjSpectrum;
      for (let k = 0; k < work.length; k += 2) {
        work[k] = a[k] * b[k] - a[k + 1] * b[k + 1];
        work[k + 1] = a[k] * b[k + 1] + a[k + 1] * b[k];
      }
      plan.inverseRows(work, mapHeight);
      for (let v = 0; v < mapHeight; v++) {
        for (let u = 0; u < mapWidth; u++) {
          const d = img.windowNorm[v * mapWidth + u] * tpl.norm;
          out[v * mapWidth + u] = d > 0 ? work[2 * (v * N + u)] / d : 0;
        }
      }
      return out;
    },
  };
}

export interface Peak {
  readonly value: number;
  /** Sub-pixel position in the map. */
  readonly x: number;
  readonly y: number;
}

/** Largest value of a map, refined by a parabola along x and along y through the neighbours. */
export function findPeak(map: Float64Array, w: number, h: number): Peak {
  let best = 0;
  let low = map[0];
  for (let k = 1; k < w * h; k++) {
    if (map[k] > map[best]) best = k;
    if (map[k] < low) low = map[k];
  }
  // a flat map (a flat simulation correlates with nothing): the centred placement
  if (map[best] === low) return { value: map[best], x: (w - 1) / 2, y: (h - 1) / 2 };
  const ix = best % w;
  const iy = (best - ix) / w;
  const v = map[best];
  if (w < 3 && h < 3) return { value: v, x: ix, y: iy };
  // parabola c + b t + a t^2 through (-1, m), (0, c), (1, p); vertex offset clamped to +-0.5
  const para = (m: number, p: number) => {
    const a = 0.5 * (m + p) - v;
    const b = 0.5 * (p - m);
    if (!(a < 0)) return [0, 0];
    const t = Math.max(-0.5, Math.min(0.5, -b / (2 * a)));
    return [t, b * t + a * t * t];
  };
  const [dx, gx] = ix > 0 && ix < w - 1 ? para(map[best - 1], map[best + 1]) : [0, 0];
  const [dy, gy] = iy > 0 && iy < h - 1 ? para(map[best - w], map[best + w]) : [0, 0];
  return { value: v + gx + gy, x: ix + dx, y: iy + dy };
}

/**
 * Rotate (counter-clockwise on screen by rotation_deg) and scale an image
 * about its centre into out (same size), bilinear, edges clamped.
 */
export function transformImage(out: Float64Array, src: ArrayLike<number>, w: number, h: number, rotation_deg: number, scale: number): Float64Array {
  const th = (rotation_deg * Math.PI) / 180;
  const c = Math.cos(th) / scale;
  const s = Math.sin(th) / scale;
  const cx = (w - 1) / 2;
  const cy = (h - 1) / 2;
  for (let y = 0; y < h; y++) {
    const dy = y - cy;
    for (let x = 0; x < w; x++) {
      const dx = x - cx;
      // inverse map: source = c + Rscreen(-theta) (p - c) / scale
      out[y * w + x] = bilinear(src, w, h, cx + c * dx - s * dy, cy + s * dx + c * dy);
    }
  }
  return out;
}

/** The w x h window of an image whose top-left sits at the sub-pixel offset (ox, oy), bilinear. */
export function extractWindow(out: Float64Array, src: ArrayLike<number>, W: number, H: number, ox: number, oy: number, w: number, h: number): Float64Array {
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) out[y * w + x] = bilinear(src, W, H, ox + x, oy + y);
  return out;
}

export interface RegistrationResult extends Registration {
  /** The transformed simulation under the micrograph (template size). */
  readonly window: Float64Array;
  /** The whole transformed simulation (image size), for re-use. */
  readonly transformed: Float64Array;
  /** Number of NCC maps computed. */
  readonly evaluations: number;
}

/**
 * Best overlay of the simulation `sim` (image size of the correlator) on the
 * prepared micrograph: shift, rotation within +-maxRotation_deg, scale within
 * 1 +- maxScale.
 */
export function register(cor: Correlator, tpl: PreparedTemplate, sim: ArrayLike<number>, opts: RegistrationOptions = {}): RegistrationResult {
  return registerGroup([cor], [tpl], [sim], opts)[0];
}

/**
 * One registration shared by several micrographs of the same field of view
 * (same beam direction, same crop size and pixel size): the shift, rotation
 * and scale that maximise the mean of their NCC maps. Each result carries the
 * joint peak value as its ncc.
 */
export function registerGroup(cors: readonly Correlator[], tpls: readonly PreparedTemplate[], sims: readonly ArrayLike<number>[], opts: RegistrationOptions = {}): RegistrationResult[] {
  const n = cors.length;
  if (n === 0 || tpls.length !== n || sims.length !== n) throw new RangeError('registerGroup: need one correlator, template and simulation per micrograph');
  const cor = cors[0];
  for (const c of cors) {
    if (c.imageWidth !== cor.imageWidth || c.imageHeight !== cor.imageHeight || c.templateWidth !== cor.templateWidth || c.templateHeight !== cor.templateHeight) {
      throw new RangeError('registerGroup: the micrographs of one view must have the same size');
    }
  }
  const maxR = opts.maxRotation_deg ?? DEFAULT_MAX_ROTATION_DEG;
  const maxS = opts.maxScale ?? DEFAULT_MAX_SCALE;
  const minStepR = opts.rotationStep_deg ?? 0.25;
  const minStepS = opts.scaleStep ?? 0.0025;
  const W = cor.imageWidth;
  const H = cor.imageHeight;
  const map = new Float64Array(cor.mapWidth * cor.mapHeight);
  const sum = new Float64Array(cor.mapWidth * cor.mapHeight);
  const buf = new Float64Array(W * H);
  const cache = new Map<string, { value: number; peak: Peak }>();

  let evaluations = 0;
  const evaluate = (r: number, s: number) => {
    const key = `${r.toFixed(6)} ${s.toFixed(8)}`;
    const hit = cache.get(key);
    if (hit) return hit;
    evaluations++;
    if (n === 1) {
      const img = r === 0 && s === 1 ? sims[0] : transformImage(buf, sims[0], W, H, r, s);
      cor.ncc(cor.prepareImage(img), tpls[0], sum);
    } else {
      sum.fill(0);
      for (let j = 0; j < n; j++) {
        const img = r === 0 && s === 1 ? sims[j] : transformImage(buf, sims[j], W, H, r, s);
        cors[j].ncc(cors[j].prepareImage(img), tpls[j], map);
        for (let k = 0; k < sum.length; k++) sum[k] += map[k] / n;
      }
    }
    const peak = findPeak(sum, cor.mapWidth, cor.mapHeight);
    const res = { value: peak.value, peak };
    cache.set(key, res);
    return res;
  };
  const search = opts.search ?? true;
  let r0 = opts.start?.rotation_deg ?? 0;
  let s0 = opts.start?.scale ?? 1;
  let best = evaluate(r0, s0);
  let stepR = Math.min(maxR / 2, opts.initialRotationStep_deg ?? Infinity);
  let stepS = Math.min(maxS / 2, opts.initialScaleStep ?? Infinity);
  const searchR = search && maxR > 0;
  const searchS = search && maxS > 0;
  for (let iter = 0; iter < 60 && (searchR || searchS); iter++) {
    let moved = false;
    let br = r0;
    let bs = s0;
    for (const i of searchR ? [-1, 0, 1] : [0]) {
      for (const j of searchS ? [-1, 0, 1] : [0]) {
        const r = clamp(r0 + i * stepR, -maxR, maxR);
        const s = clamp(s0 + j * stepS, 1 - maxS, 1 + maxS);
        const e = evaluate(r, s);
        if (e.value > best.value + 1e-12) {
          best = e;
          br = r;
          bs = s;
          moved = true;
        }
      }
    }
    r0 = br;
    s0 = bs;
    if (!moved) {
      if ((!searchR || stepR <= minStepR) && (!searchS || stepS <= minStepS)) break;
      stepR /= 2;
      stepS /= 2;
    }
  }
  // parabola through the last three points in each parameter
  let rf = r0;
  let sf = s0;
  if (searchR) rf = clamp(r0 + stepR * vertex(evaluate(clamp(r0 - stepR, -maxR, maxR), s0).value, best.value, evaluate(clamp(r0 + stepR, -maxR, maxR), s0).value), -maxR, maxR);
  if (searchS) sf = clamp(s0 + stepS * vertex(evaluate(r0, clamp(s0 - stepS, 1 - maxS, 1 + maxS)).value, best.value, evaluate(r0, clamp(s0 + stepS, 1 - maxS, 1 + maxS)).value), 1 - maxS, 1 + maxS);
  if (rf !== r0 || sf !== s0) {
    const e = evaluate(rf, sf);
    if (e.value >= best.value) {
      best = e;
      r0 = rf;
      s0 = sf;
    }
  }
  const w = cor.templateWidth;
  const h = cor.templateHeight;
  return sims.map((sim) => {
    const transformed = r0 === 0 && s0 === 1 ? Float64Array.from(sim) : transformImage(new Float64Array(W * H), sim, W, H, r0, s0);
    const window = extractWindow(new Float64Array(w * h), transformed, W, H, best.peak.x, best.peak.y, w, h);
    return {
      ncc: best.value,
      shiftX_px: (W - w) / 2 - best.peak.x,
      shiftY_px: (H - h) / 2 - best.peak.y,
      rotation_deg: r0,
      scale: s0,
      offsetX: best.peak.x,
      offsetY: best.peak.y,
      window,
      transformed,
      evaluations,
    };
  });
}

function clamp(x: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, x));
}

/** Vertex of the parabola through (-1, m), (0, c), (1, p), limited to [-1, 1]; 0 when not a maximum. */
function vertex(m: number, c: number, p: number): number {
  const den = m - 2 * c + p;
  if (!(den < 0)) return 0;
  return Math.max(-1, Math.min(1, (0.5 * (m - p)) / den));
}
