// Benchmark: the image container in a per-pixel loop of the renderer's shape (write two
// intensities per pixel, read them back for statistics), ndarray views (.set/.get) against
// plain Float32Array indexing, same pixel count, same run. Whole-image work (crop, flip,
// bin) uses the views (src/imaging/imageView.ts); this ratio is why the renderer's hot
// loops keep typed arrays. Run with `node bench/imageContainer.mjs` after a build.
import ndarray from 'ndarray';
import { binMean, cropView, flipRowsView, imageView, toFloat64 } from '../dist/imaging/imageView.js';

const W = 512;
const H = 512;
const REPS = 20;

function typed() {
  const bf = new Float32Array(W * H);
  const df = new Float32Array(W * H);
  let s = 0;
  for (let r = 0; r < REPS; r++) {
    let k = 0;
    for (let j = 0; j < H; j++) for (let i = 0; i < W; i++, k++) {
      bf[k] = (i * 0.001 + j) * 1e-3;
      df[k] = 1 - bf[k];
    }
    for (let k2 = 0; k2 < W * H; k2++) s += bf[k2] - df[k2];
  }
  return s;
}

function views() {
  const bf = ndarray(new Float32Array(W * H), [H, W]);
  const df = ndarray(new Float32Array(W * H), [H, W]);
  let s = 0;
  for (let r = 0; r < REPS; r++) {
    for (let j = 0; j < H; j++) for (let i = 0; i < W; i++) {
      bf.set(j, i, (i * 0.001 + j) * 1e-3);
      df.set(j, i, 1 - bf.get(j, i));
    }
    for (let j = 0; j < H; j++) for (let i = 0; i < W; i++) s += bf.get(j, i) - df.get(j, i);
  }
  return s;
}

function time(f) {
  f(); // warm-up
  const t = [];
  for (let k = 0; k < 5; k++) {
    const t0 = performance.now();
    f();
    t.push(performance.now() - t0);
  }
  return t.sort((a, b) => a - b)[2];
}

const tTyped = time(typed);
const tViews = time(views);
const img = imageView(Float64Array.from({ length: 2048 * 2048 }, (_, k) => k % 251), 2048, 2048);
const tWhole = time(() => toFloat64(flipRowsView(cropView(binMean(img, 2), 10, 10, 900, 900))));
console.log(`per-pixel loop, ${W}x${H} x ${REPS}: typed arrays ${tTyped.toFixed(1)} ms, ndarray get/set ${tViews.toFixed(1)} ms, ratio ${(tViews / tTyped).toFixed(2)}`);
console.log(`whole-image views on 2048x2048: bin 2 + crop + flip + copy ${tWhole.toFixed(1)} ms`);
