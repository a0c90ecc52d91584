/**
 * The image container: ndarray views over typed arrays, shape [height, width]
 * (row index first, rows top to bottom, as the images are stored). Cropping,
 * flipping and strided sub-sampling are views (no copy); whole-image
 * arithmetic goes through ndarray-ops. The hot loops of the renderer keep
 * plain typed-array indexing (bench/imageContainer.mjs measures why).
 */
import ndarray, { type Data, type NdArray } from 'ndarray';
import ops from 'ndarray-ops';

/** A [height, width] view of row-major pixel data. */
export function imageView<T extends Data<number>>(data: T, width: number, height: number): NdArray<T> {
  if (data.length < width * height) throw new RangeError(`imageView: ${data.length} values for ${width} x ${height} pixels`);
  return ndarray(data, [height, width]);
}

/** The w x h window whose top-left pixel is (x0, y0): a view. */
export function cropView<T extends Data<number>>(img: NdArray<T>, x0: number, y0: number, w: number, h: number): NdArray<T> {
  const [H, W] = img.shape;
  if (x0 < 0 || y0 < 0 || w < 1 || h < 1 || x0 + w > W || y0 + h > H) {
    throw new RangeError(`cropView: [${x0}, ${y0}, ${w}, ${h}] is outside the ${W} x ${H} image`);
  }
  return img.lo(y0, x0).hi(h, w);
}

/** Top and bottom exchanged (a mirror about the horizontal axis): a view. */
export function flipRowsView<T extends Data<number>>(img: NdArray<T>): NdArray<T> {
  return img.step(-1, 1);
}

/** A contiguous Float64Array copy of any view, row by row. */
export function toFloat64(img: NdArray<Data<number>>): Float64Array {
  const [h, w] = img.shape;
  const out = ndarray(new Float64Array(w * h), [h, w]);
  ops.assign(out as NdArray<Data<number>>, img);
  return out.data;
}

/**
 * Mean of f x f blocks (a partial block at the right or bottom edge is
 * dropped): the sum of the f^2 strided views lo(j, i).step(f, f), scaled.
 */
export function binMean(img: NdArray<Data<number>>, f: number): NdArray<Float64Array> {
  if (!(Number.isInteger(f) && f >= 1)) throw new RangeError(`binMean: factor must be a positive integer, got ${f}`);
  const [H, W] = img.shape;
  const h = Math.floor(H / f);
  const w = Math.floor(W / f);
  const out = ndarray(new Float64Array(w * h), [h, w]);
  for (let j = 0; j < f; j++) for (let i = 0; i < f; i++) ops.addeq(out, img.lo(j, i).step(f, f).hi(h, w));
  if (f > 1) ops.mulseq(out, 1 / (f * f));
  return out;
}
