/** npm fft.js (CommonJS, no type declarations of its own): the part thinfoil uses. */
declare module 'fft.js' {
  class FFT {
    constructor(size: number);
    transform(out: Float64Array, data: Float64Array): void;
    inverseTransform(out: Float64Array, data: Float64Array): void;
  }
  export default FFT;
}
