/**
 * Writes the rendered images of a scenario: per condition and field an 8-bit
 * contrast-stretched PNG for viewing and a 32-bit float TIFF holding the
 * intensity as a fraction of the incident beam.
 */
import type { ConditionImages } from '../imaging/renderScenario.js';
import { autoStretch, encodeGreyPng, stretchToBytes } from './png.js';
import { encodeFloatTiff } from './tiff.js';

export interface ImageEntry {
  readonly condition: string;
  readonly field: 'bf' | 'df';
  readonly png: string;
  readonly tiff: string;
  readonly width: number;
  readonly height: number;
  readonly min: number;
  readonly max: number;
  readonly mean: number;
  /** Perfect-crystal intensity of this condition and field. */
  readonly background: number;
  /** Intensities mapped to PNG grey 0 and 255. */
  readonly stretch: { readonly lo: number; readonly hi: number };
}

export function imageStats(img: Float32Array): { min: number; max: number; mean: number } {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  for (let i = 0; i < img.length; i++) {
    const v = img[i];
    if (v < min) min = v;
    if (v > max) max = v;
    sum += v;
  }
  return { min, max, mean: sum / img.length };
}

/** Writes one file of the output set by name and returns the path to report (e.g. OutputSet.write). */
export type SetWriter = (name: string, data: Uint8Array | string) => string;

export function writeConditionImages(write: SetWriter, images: readonly ConditionImages[], scenarioName: string): ImageEntry[] {
  const entries: ImageEntry[] = [];
  for (const ci of images) {
    for (const field of ['bf', 'df'] as const) {
      const img = field === 'bf' ? ci.bf : ci.df;
      const base = `${ci.condition.id}-${field}`;
      const stretch = autoStretch(img);
      const png = write(`${base}.png`, encodeGreyPng(stretchToBytes(img, stretch.lo, stretch.hi), ci.width, ci.height));
      const g = ci.condition.g;
      const description =
        `thinfoil simulation (model, not a measurement): ${scenarioName}; condition ${ci.condition.id}, ` +
        `g = (${g.join(' ')}), ${field === 'bf' ? 'bright field' : 'dark field'}, intensity as a fraction of the incident beam`;
      const tiff = write(`${base}.tif`, encodeFloatTiff(img, ci.width, ci.height, { pixel_nm: ci.pixel_nm, description }));
      const st = imageStats(img);
      entries.push({
        condition: ci.condition.id,
        field,
        png,
        tiff,
        width: ci.width,
        height: ci.height,
        ...st,
        background: field === 'bf' ? ci.background.bf : ci.background.df,
        stretch: { lo: stretch.lo, hi: stretch.hi },
      });
    }
  }
  return entries;
}
