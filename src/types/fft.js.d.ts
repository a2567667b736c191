// A typed surface for the part of fft.js 4.0.4 we use; a local declaration takes precedence over the
// package's all-`any` lib/fft.d.ts.
declare module "fft.js" {
  type NumArr = number[] | Float64Array | Float32Array;
  class FFT {
    constructor(size: number);
    readonly size: number;
    createComplexArray(): number[];
    completeSpectrum(spectrum: NumArr): void;
    transform(out: NumArr, data: ArrayLike<number>): void;
    realTransform(out: NumArr, data: ArrayLike<number>): void;
    inverseTransform(out: NumArr, data: ArrayLike<number>): void;
  }
  export = FFT;
}
