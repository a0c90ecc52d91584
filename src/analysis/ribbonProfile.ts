/**
 * The intensity profile across a straight line image, averaged along the
 * line, and the two peaks of a dissociated dislocation in weak beam.
 *
 * Profile: every pixel centre p (nm, +y down) gets its signed distance
 * t = (p - c) . n from the line through c, n the unit normal of the line on the
 * screen (the line direction turned 90 degrees counter-clockwise); pixels are
 * binned by t (bins of width binWidth_nm) and averaged, so the profile is the
 * mean along the line with its standard error per bin (the scatter along the
 * line). For an oblique line the bins mix pixel phases, so bins narrower than
 * a pixel are filled (the slanted-edge idea of ISO 12233); for a line along x or
 * y keep bins of one pixel.
 *
 * Peaks: local maxima of the profile; the two highest that are at least
 * minSeparation apart; each refined by the vertex of the parabola through
 * the bin and its two neighbours, with the uncertainty propagated from the
 * bins' standard errors (derivatives of the vertex formula).
 */
import { InputError } from '../errors.js';

const DEG = Math.PI / 180;

export interface GreyImage {
  readonly width: number;
  readonly height: number;
  /** Row by row, top row first. */
  readonly data: ArrayLike<number>;
}

export interface ProfileOptions {
  /** Screen angle of the line: degrees counter-clockwise from +x, +y down (modulo 180). */
  readonly lineAngle_deg: number;
  readonly pixel_nm: number;
  /** A point on the line, pixels from the top-left corner (default: the image centre). */
  readonly centre_px?: readonly [number, number];
  /** The profile runs from -halfWidth_nm to +halfWidth_nm across the line. */
  readonly halfWidth_nm: number;
  /** Only pixels within this distance along the line from the centre are used (default: all). */
  readonly halfLength_nm?: number;
  /** Bin width (default: one pixel). */
  readonly binWidth_nm?: number;
}

export interface Profile {
  /** Bin centres (nm across the line; positive to the left of the line direction on the screen). */
  readonly x_nm: Float64Array;
  readonly mean: Float64Array;
  /** Standard error of each bin's mean (NaN for bins with fewer than 2 pixels). */
  readonly sem: Float64Array;
  readonly count: Int32Array;
}

/** Unit vectors on the screen (image components, +y down) along and across a line at a screen angle. */
export function lineAxes(lineAngle_deg: number): { along: [number, number]; across: [number, number] } {
  const a = lineAngle_deg * DEG;
  const along: [number, number] = [Math.cos(a), -Math.sin(a)];
  // turned 90 degrees counter-clockwise on the screen: angle a + 90
  const across: [number, number] = [Math.cos(a + Math.PI / 2), -Math.sin(a + Math.PI / 2)];
  return { along, across };
}

export function lineProfile(img: GreyImage, o: ProfileOptions): Profile {
  const bin = o.binWidth_nm ?? o.pixel_nm;
  const nb = Math.max(1, Math.round((2 * o.halfWidth_nm) / bin));
  const start = -(nb * bin) / 2;
  const cx = (o.centre_px?.[0] ?? img.width / 2) * o.pixel_nm;
  const cy = (o.centre_px?.[1] ?? img.height / 2) * o.pixel_nm;
  const { along, across } = lineAxes(o.lineAngle_deg);
  const s = new Float64Array(nb);
  const s2 = new Float64Array(nb);
  const count = new Int32Array(nb);
  const hl = o.halfLength_nm ?? Infinity;
  for (let j = 0; j < img.height; j++) {
    const py = (j + 0.5) * o.pixel_nm - cy;
    for (let i = 0; i < img.width; i++) {
      const px = (i + 0.5) * o.pixel_nm - cx;
      const t = px * across[0] + py * across[1];
      const k = Math.floor((t - start) / bin);
      if (k < 0 || k >= nb) continue;
      if (Math.abs(px * along[0] + py * along[1]) > hl) continue;
      const v = img.data[j * img.width + i];
      s[k] += v;
      s2[k] += v * v;
      count[k]++;
    }
  }
  const x = new Float64Array(nb);
  const mean = new Float64Array(nb);
  const sem = new Float64Array(nb);
  for (let k = 0; k < nb; k++) {
    x[k] = start + (k + 0.5) * bin;
    const n = count[k];
    mean[k] = n > 0 ? s[k] / n : NaN;
    sem[k] = n > 1 ? Math.sqrt(Math.max(0, (s2[k] - (s[k] * s[k]) / n) / (n - 1)) / n) : NaN;
  }
  return { x_nm: x, mean, sem, count };
}

export interface Peak {
  /** Sub-bin position (nm) and its one-sigma uncertainty (nm). */
  readonly x_nm: number;
  readonly sigma_nm: number;
  /** Height of the parabola's vertex. */
  readonly height: number;
}

export interface PeakPair {
  /** The two peaks, left (smaller x) first. */
  readonly peaks: readonly [Peak, Peak];
  readonly separation_nm: number;
  readonly sigma_nm: number;
}

/** Vertex offset (in units of the spacing) of the parabola through (-1, a), (0, b), (1, c). */
function vertex(a: number, b: number, c: number): number {
  const d = a - 2 * b + c;
  return d < 0 ? (0.5 * (a - c)) / d : 0;
}

/** A local maximum refined by a parabola, with its uncertainty from the standard errors (NaN errors count as 0). */
export function refinePeak(x: ArrayLike<number>, y: ArrayLike<number>, sem: ArrayLike<number> | undefined, k: number): Peak {
  if (k <= 0 || k >= y.length - 1) return { x_nm: x[k], sigma_nm: NaN, height: y[k] };
  const h = x[k + 1] - x[k];
  const a = y[k - 1], b = y[k], c = y[k + 1];
  const off = Math.max(-0.5, Math.min(0.5, vertex(a, b, c)));
  const d = a - 2 * b + c;
  let v2 = 0;
  if (sem !== undefined && d < 0) {
    // d off / d a, d b, d c of off = (a - c) / (2 d)
    const dA = (0.5 * d - 0.5 * (a - c)) / (d * d);
    const dB = (a - c) / (d * d);
    const dC = (-0.5 * d - 0.5 * (a - c)) / (d * d);
    const e = (q: number) => (Number.isFinite(q) ? q : 0);
    v2 = (dA * e(sem[k - 1])) ** 2 + (dB * e(sem[k])) ** 2 + (dC * e(sem[k + 1])) ** 2;
  }
  const height = b - ((a - c) * (a - c)) / (8 * d || 1);
  return { x_nm: x[k] + off * h, sigma_nm: Math.sqrt(v2) * Math.abs(h), height: d < 0 ? height : b };
}

/**
 * Gaussian smoothing of equally spaced samples, standard deviation sigmaSteps samples (kernel to 4
 * sigma, weights renormalised at the ends and over NaN samples, which are skipped and stay NaN).
 */
export function gaussianSmooth1d(y: ArrayLike<number>, sigmaSteps: number): Float64Array {
  const n = y.length;
  const r = Math.ceil(4 * sigmaSteps);
  const w = new Float64Array(2 * r + 1);
  for (let j = -r; j <= r; j++) w[j + r] = Math.exp(-0.5 * (j / sigmaSteps) ** 2);
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(y[k])) {
      out[k] = y[k];
      continue;
    }
    let s = 0, c = 0;
    for (let j = -r; j <= r; j++) {
      const i = k + j;
      if (i >= 0 && i < n && Number.isFinite(y[i])) {
        s += w[j + r] * y[i];
        c += w[j + r];
      }
    }
    out[k] = s / c;
  }
  return out;
}

/**
 * The profile minus its slowly varying background: a Gaussian smoothing of
 * standard deviation sigma_nm (much wider than a weak-beam peak) is
 * subtracted, so that a broad hump of the background is not taken for a
 * partial. NaN samples are skipped (and stay NaN). sigma_nm <= 0: unchanged.
 */
export function removeBackground(x: ArrayLike<number>, y: ArrayLike<number>, sigma_nm: number): Float64Array {
  const n = y.length;
  const out = Float64Array.from(y as ArrayLike<number>);
  if (!(sigma_nm > 0) || n < 2) return out;
  const bg = gaussianSmooth1d(y, sigma_nm / (x[1] - x[0]));
  for (let k = 0; k < n; k++) if (Number.isFinite(y[k])) out[k] = y[k] - bg[k];
  return out;
}

/**
 * Topographic prominence of the local maximum at k: its height above the
 * higher of the two lowest points between it and higher ground (or the
 * profile's end) on either side.
 */
export function prominence(y: ArrayLike<number>, k: number): number {
  const h = y[k];
  let left = h;
  for (let i = k - 1; i >= 0; i--) {
    if (!Number.isFinite(y[i])) continue;
    if (y[i] > h) break;
    left = Math.min(left, y[i]);
  }
  let right = h;
  for (let i = k + 1; i < y.length; i++) {
    if (!Number.isFinite(y[i])) continue;
    if (y[i] > h) break;
    right = Math.min(right, y[i]);
  }
  return h - Math.max(left, right);
}

/**
 * The two most prominent local maxima at least minSeparation_nm apart
 * (prominence rather than height, so that a slowly varying background of
 * the weak-beam image does not count as a peak), refined by parabolas.
 * Optionally only maxima within |x| <= window_nm of the profile's centre.
 * Returns null when the profile has fewer than two such maxima.
 */
export function twoPeaks(x: ArrayLike<number>, y: ArrayLike<number>, sem: ArrayLike<number> | undefined, minSeparation_nm: number, window_nm = Infinity): PeakPair | null {
  const maxima: { k: number; p: number }[] = [];
  for (let k = 1; k < y.length - 1; k++) {
    if (!Number.isFinite(y[k]) || Math.abs(x[k]) > window_nm) continue;
    const l = y[k - 1], r = y[k + 1];
    if (Number.isFinite(l) && Number.isFinite(r) && y[k] > l && y[k] >= r) maxima.push({ k, p: prominence(y, k) });
  }
  maxima.sort((a, b) => b.p - a.p);
  if (maxima.length < 2) return null;
  const first = maxima[0].k;
  const second = maxima.find((m) => Math.abs(x[m.k] - x[first]) >= minSeparation_nm)?.k;
  if (second === undefined) return null;
  const p1 = refinePeak(x, y, sem, Math.min(first, second));
  const p2 = refinePeak(x, y, sem, Math.max(first, second));
  return { peaks: [p1, p2], separation_nm: p2.x_nm - p1.x_nm, sigma_nm: Math.hypot(p1.sigma_nm || 0, p2.sigma_nm || 0) };
}

/** Check of the profile options a user gives (InputError naming the option). */
export function checkProfileOptions(img: GreyImage, o: ProfileOptions): void {
  if (!(o.pixel_nm > 0) || !Number.isFinite(o.pixel_nm)) throw new InputError('--pixel-nm: give the pixel size of the micrograph in nm (a positive number)');
  if (!Number.isFinite(o.lineAngle_deg)) throw new InputError('--line-angle: give the direction of the line on the micrograph in degrees');
  if (!(o.halfWidth_nm > 2 * o.pixel_nm)) throw new InputError('--half-width: the profile must be wider than a few pixels; give a half-width in nm of at least 2 pixels');
  if (o.centre_px !== undefined) {
    const [x, y] = o.centre_px;
    if (!(x >= 0 && x <= img.width && y >= 0 && y <= img.height)) throw new InputError(`--centre: ${x},${y} lies outside the ${img.width} x ${img.height} micrograph; give a point on the line in pixels from the top-left corner`);
  }
}
