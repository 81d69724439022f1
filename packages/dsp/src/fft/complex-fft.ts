import FFT from 'fft.js';
import { isPowerOfTwo, precondition } from '../util/preconditions.js';

/**
 * A complex FFT of one fixed power-of-two size over interleaved buffers
 * ([re0, im0, re1, im1, …], length 2·size). Twiddles and bit-reversal tables are built once.
 */
export interface ComplexFftPlan {
  readonly size: number;
  /** X[k] = Σ x[n]·e^{−2πikn/N}, unscaled (numpy.fft.fft convention). `output` must not alias `input`. */
  forward(input: Float64Array, output: Float64Array): void;
  /** x[n] = (1/N)·Σ X[k]·e^{+2πikn/N} (numpy.fft.ifft convention). `output` must not alias `input`. */
  inverse(input: Float64Array, output: Float64Array): void;
}

/**
 * Builds a complex FFT plan on fft.js's radix-4 transform (float64 throughout).
 *
 * NOTE: fft.js was chosen by benchmark (docs/performance.md): accurate to float64 rounding,
 * and its complex transform on Float64Array is the fastest kernel measured here.
 * @param size transform length, a power of two ≥ 2
 * @throws RangeError when size is not a power of two ≥ 2
 * @see J. W. Cooley, J. W. Tukey, "An algorithm for the machine calculation of complex
 *   Fourier series", Math. Comp. 19, 1965 (radix-2/4 decimation).
 */
export function createComplexFftPlan(size: number): ComplexFftPlan {
  precondition(isPowerOfTwo(size) && size >= 2, 'createComplexFftPlan', `size must be a power of two ≥ 2 (got ${size})`);
  const fft = new FFT(size);
  const check = (fn: string, input: Float64Array, output: Float64Array): void => {
    precondition(input.length === 2 * size, fn, `input must hold ${2 * size} values (got ${input.length})`);
    precondition(output.length === 2 * size, fn, `output must hold ${2 * size} values (got ${output.length})`);
    precondition(input !== output, fn, 'input and output must be different buffers');
  };
  return {
    size,
    forward(input, output) {
      check('ComplexFftPlan.forward', input, output);
      fft.transform(output, input);
    },
    inverse(input, output) {
      check('ComplexFftPlan.inverse', input, output);
      fft.inverseTransform(output, input);
    },
  };
}
