/**
 * Noise estimate without a model (Immerkaer 1996) and the structure test of a
 * residual, on images whose noise is drawn by numpy (an outside generator)
 * with a known standard deviation.
 */
import { describe, expect, it } from 'vitest';
import { immerkaerSigma, structureRatio } from '../../src/analysis/noiseEstimate.js';
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
