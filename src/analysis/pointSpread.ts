/**
 * The microscope's point spread applied to simulated images: a Gaussian of
 * standard deviation sigma (nm) on the intensities, edges extended with the
 * nearest pixel (the same blur identify applies to its simulations,
 * preprocess.ts gaussianBlur). Returns new images; the input is not changed.
 */
import type { ConditionImages } from '../imaging/renderScenario.js';
import { gaussianBlur } from './preprocess.js';

export function blurImage(img: Float32Array, width: number, height: number, sigma_px: number): Float32Array {
  const out = new Float64Array(width * height);
  gaussianBlur(out, img, width, height, sigma_px);
  return Float32Array.from(out);
}

export function blurImages(images: readonly ConditionImages[], sigma_nm: number): ConditionImages[] {
  return images.map((ci) => {
    const s = sigma_nm / ci.pixel_nm;
    return { ...ci, bf: blurImage(ci.bf, ci.width, ci.height, s), df: blurImage(ci.df, ci.width, ci.height, s) };
  });
}
