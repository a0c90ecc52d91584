/**
 * Noise estimate without a model (Immerkaer 1996) and the structure test of a
 * residual, on images whose noise is drawn by numpy (an outside generator)
 * with a known standard deviation.
 */
import { describe, expect, it } from 'vitest';
import { immerkaerSigma, structureRatio } from '../../src/analysis/noiseEstimate.js';
import { absoluteFit, MODEL_FLOOR, STRUCTURE_LIMIT } from '../../src/analysis/identifyChecks.js';
import type { PreparedMicrograph } from '../../src/analysis/identifyMicrographs.js';
import { needPython, pythonJson } from '../python.js';

const py = needPython('numpy');
const W = 96;
const H = 80;

/** numpy: Gaussian noise of standard deviation sd on a tilted plane plus an optional smooth blob of amplitude blob. */
function image(sd: number, blob: number, seed: number): { data: number[]; noise: number[] } {
  return pythonJson(
    `import json, numpy as np
rng = np.random.default_rng(${seed})
y, x = np.mgrid[0:${H}, 0:${W}]
noise = rng.normal(0, ${sd}, size=(${H}, ${W}))
img = 3.0 + 0.01 * x - 0.02 * y + ${blob} * np.exp(-((x - 40) ** 2 + (y - 35) ** 2) / (2 * 6.0 ** 2)) + noise
print(json.dumps({'data': img.ravel().tolist(), 'noise': noise.ravel().tolist()}))`,
  );
}

describe('immerkaerSigma (Immerkaer 1996, CVIU 64, 300)', () => {
  it('white Gaussian noise of sd 0.7 on a tilted plane: the estimate is within 5 % of 0.7', (ctx) => {
    py.require(ctx);
    const { data } = image(0.7, 0, 1);
    // the estimate's own scatter on 94 x 78 interior pixels is about 1 %; 5 % allows for that and the plane's rounding
    expect(immerkaerSigma(data, W, H)).toBeGreaterThan(0.665);
    expect(immerkaerSigma(data, W, H)).toBeLessThan(0.735);
  });
  it('a smooth feature (Gaussian blob, width 6 px, 5 times the noise) barely moves it (the Laplacian-difference mask annihilates smooth intensity)', (ctx) => {
    py.require(ctx);
    const { data } = image(0.2, 1.0, 2);
    expect(Math.abs(immerkaerSigma(data, W, H) - 0.2)).toBeLessThan(0.012);
  });
});

describe('structureRatio', () => {
  it('a residual of pure white noise gives about 1; the same noise plus a blob of 3 sigma (width 6 px) gives more than the limit 4 (the ratio averages over the image, so small features need a larger amplitude)', (ctx) => {
    py.require(ctx);
    const { noise } = image(0.5, 0, 3);
    const r = Float64Array.from(noise);
    const pure = structureRatio(r, W, H, 0.5);
    // expected 1 (the smoothed noise's variance is sigma^2 sum k^2); scatter about 0.1 for ~ 7000 / 28 independent samples
    expect(pure).toBeGreaterThan(0.7);
    expect(pure).toBeLessThan(1.3);
    const { data } = image(0.5, 1.5, 3);
    const withBlob = Float64Array.from(data, (v, k) => v - (3.0 + 0.01 * (k % W) - 0.02 * Math.floor(k / W)));
    expect(structureRatio(withBlob, W, H, 0.5)).toBeGreaterThan(4);
  });
});

describe('absoluteFit: a noise-free micrograph of the right model is explained', () => {
  // A clean micrograph has noise near 0, so any residual would be "structure" without the model floor
  // (MODEL_FLOOR, our choice: a residual below 15 % of the contrast RMS is not called unexplained).
  const W2 = 48;
  const H2 = 40;
  const blob = (amp: number, x0: number) => {
    const a = new Float64Array(W2 * H2);
    for (let y = 0; y < H2; y++) for (let x = 0; x < W2; x++) a[y * W2 + x] = amp * Math.exp(-((x - x0) ** 2 + (y - 20) ** 2) / (2 * 5 ** 2));
    return a;
  };
  const micrograph = (contrast: Float64Array) => ({ conditionId: 'g200', width: W2, height: H2, contrast }) as unknown as PreparedMicrograph;
  it('a 5 % smooth misfit on a clean image is explained; a wrong blob position is not', () => {
    const model = blob(1, 24);
    const clean = blob(1, 24).map((v, k) => v + 0.05 * model[k] * Math.cos(k / 7));
    const ok = absoluteFit([micrograph(clean)], [model], [1]);
    expect(ok.perMicrograph[0].sigma).toBeLessThan(0.01);
    expect(ok.perMicrograph[0].structure).toBeGreaterThan(STRUCTURE_LIMIT); // by the noise alone it would fail
    expect(ok.explained).toBe(true);
    const wrong = absoluteFit([micrograph(blob(1, 12))], [model], [1]);
    expect(wrong.explained).toBe(false);
    expect(wrong.perMicrograph[0].residualRms).toBeGreaterThan(MODEL_FLOOR * wrong.perMicrograph[0].contrastRms);
  });
});
