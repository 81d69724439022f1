// fft.js ships loose `any` typings; this precise declaration takes precedence so the
// engine stays free of `any`. Only the members Earmark calls are declared.
declare module 'fft.js' {
  /** Radix-4 complex FFT over interleaved [re, im, re, im, …] buffers (fft.js 4.0.4). */
  class FFT {
    constructor(size: number);
    readonly size: number;
    /** Forward transform, e^{-iωn} kernel, unscaled. `out` and `data` must differ. */
    transform(out: Float64Array, data: Float64Array): void;
    /** Inverse transform, e^{+iωn} kernel, scaled by 1/size. */
    inverseTransform(out: Float64Array, data: Float64Array): void;
    /** Forward transform of a real input; fills only the lower half of `out`. */
    realTransform(out: Float64Array, data: Float64Array): void;
    /** Fills the upper half of a realTransform output by Hermitian symmetry. */
    completeSpectrum(spectrum: Float64Array): void;
  }
  export = FFT;
}
