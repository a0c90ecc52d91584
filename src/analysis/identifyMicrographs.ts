/**
 * Micrographs made ready for comparison: checked against the scenario,
 * cropped, binned to a working size, turned into relative contrast with the
 * background plane removed. Every problem a user can cause is an InputError
 * naming the micrograph and the fix.
 */
import { InputError } from '../errors.js';
import type { Condition, Scenario } from '../scenario/types.js';
import { resolveCondition, type ResolvedCondition } from '../imaging/resolveCondition.js';
import { DEFAULT_SETTINGS, usableTagPixel, type MicrographSettings } from './identifySettings.js';
import { simulatedGAngle_deg } from './identifyView.js';
import { binImage, cropImage, relativeContrast, removePlane, standardise, type Grid, type ImageLike } from './preprocess.js';

export interface MicrographInput {
  readonly conditionId: string;
  /** The decoded file (grey values as stored). */
  readonly image: ImageLike;
  /** Pixel size from the file's resolution tags, if any. */
  readonly filePixel_nm?: number;
  /** File name, for messages and the report. */
  readonly source: string;
  /** Made by src/analysis/synthetic.ts rather than a microscope. */
  readonly synthetic?: boolean;
}

export interface PreparedMicrograph {
  readonly conditionId: string;
  readonly condition: Condition;
  readonly resolved: ResolvedCondition;
  readonly settings: MicrographSettings;
  readonly source: string;
  readonly synthetic: boolean;
  /** Pixel size of the file and where it came from. */
  readonly filePixel_nm: number;
  readonly pixelFrom: 'scenario' | 'file';
  readonly bin: number;
  readonly crop: readonly [number, number, number, number];
  /** Working image: the binned crop. */
  readonly width: number;
  readonly height: number;
  readonly pixel_nm: number;
  /** The binned crop, grey values as in the file (for display). */
  readonly image: Grid;
  /** What the simulations are compared with: relative contrast (or, for "display" images, standardised grey), plane removed. */
  readonly contrast: Float64Array;
  /** Simulation margin around the crop (pixels per side): the largest shift searched. */
  readonly margin: number;
  /** Direction of g in the micrograph and in the scenario's own simulation (screen degrees, counter-clockwise from +x). */
  readonly gAngle_deg: number;
}

/** Largest working side (pixels) chosen by the automatic binning. */
export const AUTO_BIN_SIDE = 256;
/** Smallest working side (pixels). */
export const MIN_SIDE = 16;

export function prepareMicrographs(sc: Scenario, inputs: readonly MicrographInput[], settings: ReadonlyMap<string, MicrographSettings>): PreparedMicrograph[] {
  if (inputs.length === 0) throw new InputError('no micrograph given; add --micrograph <conditionId>=<file> for each micrograph');
  const ids = sc.conditions.map((c) => c.id);
  const seen = new Set<string>();
  for (const m of inputs) {
    if (!ids.includes(m.conditionId)) {
      throw new InputError(`--micrograph ${m.conditionId}=${m.source}: "${m.conditionId}" is not a condition of the scenario; use one of ${ids.join(', ')}`);
    }
    if (seen.has(m.conditionId)) throw new InputError(`--micrograph ${m.conditionId} is given twice; give one micrograph per condition`);
    seen.add(m.conditionId);
  }
  const order = (m: MicrographInput) => ids.indexOf(m.conditionId);
  return [...inputs].sort((a, b) => order(a) - order(b)).map((m) => prepareOne(sc, m, settings.get(m.conditionId) ?? DEFAULT_SETTINGS));
}

function prepareOne(sc: Scenario, m: MicrographInput, s: MicrographSettings): PreparedMicrograph {
  const id = m.conditionId;
  const key = `micrographs.${id}`;
  const condition = sc.conditions.find((c) => c.id === id)!;
  const { width: W, height: H } = m.image;
  if (!(W >= 1 && H >= 1)) throw new InputError(`${m.source} has no pixels; give a micrograph image`);

  let filePixel_nm: number;
  let pixelFrom: 'scenario' | 'file';
  if (s.pixel_nm !== undefined) {
    filePixel_nm = s.pixel_nm;
    pixelFrom = 'scenario';
  } else {
    const tag = usableTagPixel(m.filePixel_nm);
    if (tag === undefined) {
      throw new InputError(
        `${key}.pixel_nm is missing and ${m.source} carries no usable pixel size (none, or a 72/96 dpi placeholder); give the pixel size in nm, e.g. "micrographs": {"${id}": {"pixel_nm": 0.5}}`,
      );
    }
    filePixel_nm = tag;
    pixelFrom = 'file';
  }
  if (!(filePixel_nm > 0)) throw new InputError(`${key}.pixel_nm must be greater than 0 (nm per pixel)`);

  const crop = s.crop ?? ([0, 0, W, H] as const);
  const [cx, cy, cw, ch] = crop;
  if (cx + cw > W || cy + ch > H) {
    throw new InputError(`${key}.crop [${crop.join(', ')}] reaches outside the ${W} x ${H} pixel image ${m.source}; keep x + width <= ${W} and y + height <= ${H}`);
  }
  const bin = s.bin ?? Math.max(1, Math.ceil(Math.max(cw, ch) / AUTO_BIN_SIDE));
  const image = binImage(cropImage(m.image, crop), bin);
  if (image.width < MIN_SIDE || image.height < MIN_SIDE) {
    throw new InputError(`${key}: the crop is ${image.width} x ${image.height} pixels after binning by ${bin}; compare at least ${MIN_SIDE} x ${MIN_SIDE} pixels (a larger crop or a smaller "bin")`);
  }
  for (let k = 0; k < image.data.length; k++) {
    if (!Number.isFinite(image.data[k])) throw new InputError(`${m.source} holds NaN or infinite pixel values inside the crop; crop them away or fix the file`);
  }
  const pixel_nm = filePixel_nm * bin;
  const n = image.width * image.height;
  let contrast: Float64Array;
  if (s.intensity === 'linear') {
    const rel = relativeContrast(image, s.offset);
    if (rel === null) {
      throw new InputError(`${key}.offset (${s.offset}) leaves a background at or below zero in ${m.source}; lower the offset, or set "intensity": "display" if the grey values are not proportional to intensity`);
    }
    contrast = removePlane(new Float64Array(n), rel.data, image.width, image.height);
  } else {
    const flat = removePlane(new Float64Array(n), image.data, image.width, image.height);
    contrast = flat;
    standardise(contrast, flat);
  }
  let sd = 0;
  for (let k = 0; k < n; k++) sd += contrast[k] * contrast[k];
  if (!(sd > 0)) throw new InputError(`${m.source} is uniform inside the crop (no contrast at all); check the file and the crop`);

  const maxShift_nm = s.maxShift_nm ?? 0.2 * Math.min(image.width, image.height) * pixel_nm;
  const margin = Math.min(Math.max(image.width, image.height), Math.ceil(maxShift_nm / pixel_nm - 1e-9));
  return {
    conditionId: id,
    condition,
    resolved: resolveCondition(sc, condition),
    settings: s,
    source: m.source,
    synthetic: m.synthetic === true,
    filePixel_nm,
    pixelFrom,
    bin,
    crop,
    width: image.width,
    height: image.height,
    pixel_nm,
    image,
    contrast,
    margin,
    gAngle_deg: s.gAngle_deg ?? simulatedGAngle_deg(sc, condition),
  };
}

/**
 * Groups of micrographs that share one registration: those with the same
 * "view" name (the same field of view, so the relative position of their
 * images carries information, e.g. the image side of a dislocation under g
 * and -g). They must share the beam direction, the working size and pixel
 * size and the shift margin. Micrographs without a view name are groups of
 * one. Indices into `micrographs`, in order.
 */
export function viewGroups(micrographs: readonly PreparedMicrograph[]): number[][] {
  const byName = new Map<string, number[]>();
  const out: number[][] = [];
  micrographs.forEach((m, i) => {
    const v = m.settings.view;
    if (v === undefined) {
      out.push([i]);
      return;
    }
    const g = byName.get(v);
    if (g === undefined) {
      const ng = [i];
      byName.set(v, ng);
      out.push(ng);
      return;
    }
    const first = micrographs[g[0]];
    const key = `micrographs.${m.conditionId}.view`;
    const b1 = first.condition.beam;
    const b2 = m.condition.beam;
    const cross = Math.hypot(b1[1] * b2[2] - b1[2] * b2[1], b1[2] * b2[0] - b1[0] * b2[2], b1[0] * b2[1] - b1[1] * b2[0]);
    if (cross > 1e-9 * Math.hypot(...b1) * Math.hypot(...b2)) {
      throw new InputError(`${key} "${v}" is shared with ${first.conditionId}, taken in another beam direction ([${b2.join(' ')}] against [${b1.join(' ')}]); only micrographs of one beam direction can share a view, so give this one its own view name`);
    }
    if (m.width !== first.width || m.height !== first.height || Math.abs(m.pixel_nm - first.pixel_nm) > 1e-9 * first.pixel_nm || m.margin !== first.margin) {
      throw new InputError(
        `${key} "${v}" is shared with ${first.conditionId}, but the compared images differ (${m.width} x ${m.height} at ${m.pixel_nm} nm against ${first.width} x ${first.height} at ${first.pixel_nm} nm, or another maxShift_nm); give both the same crop, bin, pixel size and maxShift_nm`,
      );
    }
    g.push(i);
  });
  return out;
}
