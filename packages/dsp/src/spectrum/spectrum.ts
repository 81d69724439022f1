import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { isPowerOfTwo, nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { createWindow, type WindowKind, type WindowSymmetry } from './windows.js';
import { placeZeroPhase } from './zero-phase.js';

/** Options of `amplitudeSpectrum`. */
export interface AmplitudeSpectrumOptions {
  /** Window shape (default `hann`). */
  window?: WindowKind;
  /** Window symmetry (default `periodic`). */
  symmetry?: WindowSymmetry;
  /** FFT size, a power of two ≥ the frame length (default: the next power of two). */
  fftSize?: number;
  /** `zero-phase` (default) puts the frame's centre at index 0; `start` puts sample 0 at index 0. */
  placement?: 'zero-phase' | 'start';
  /** A plan of size `fftSize` to reuse across calls. */
  plan?: RealFftPlan;
}

/** One-sided spectrum of a frame, scaled so that a sinusoid's peak reads its amplitude. */
export interface AmplitudeSpectrum {
  sampleRate: number;
  fftSize: number;
  /** Bin spacing fs/N in Hz; bin k is at k·binHz. */
  binHz: number;
  /** Scaled real and imaginary parts, N/2 + 1 bins. */
  re: Float64Array;
  im: Float64Array;
  /** |X[k]|·scale: the amplitude (peak, not RMS) of a sinusoid centred on bin k. */
  magnitude: Float64Array;
}

/**
 * Windowed, zero-padded amplitude spectrum of one frame. Scaling: X[k]·2/Σw for 0 < k < N/2,
 * X[k]/Σw at DC and Nyquist, i.e. the DFT divided by the window's coherent gain and the frame
 * length and folded to one side, so a sine of amplitude A centred on a bin reads A (a −20 dBFS
 * sine reads −20 dB re full scale). Zero padding interpolates the spectrum; it adds no resolution.
 * @throws RangeError when the frame is empty, the FFT size is not a power of two ≥ the frame
 *   length, or the window sums to zero
 * @see F. J. Harris 1978 (coherent gain); J. O. Smith III, "Spectral Audio Signal Processing"
 *   (zero-phase zero padding)
 */
export function amplitudeSpectrum(frame: Float64Array, sampleRate: number, options: AmplitudeSpectrumOptions = {}): AmplitudeSpectrum {
  const fn = 'amplitudeSpectrum';
  precondition(frame.length >= 1, fn, 'frame must not be empty');
  requirePositive(sampleRate, fn, 'sampleRate');
  const fftSize = options.fftSize ?? Math.max(2, nextPowerOfTwo(frame.length));
  precondition(isPowerOfTwo(fftSize) && fftSize >= 2 && fftSize >= frame.length, fn, `fftSize must be a power of two ≥ max(2, frame length ${frame.length}) (got ${fftSize})`);
  const plan = options.plan ?? createRealFftPlan(fftSize);
  precondition(plan.size === fftSize, fn, `plan size ${plan.size} does not match fftSize ${fftSize}`);
  const w = createWindow(options.window ?? 'hann', frame.length, options.symmetry ?? 'periodic');
  let sumW = 0;
  const windowed = new Float64Array(frame.length);
  for (let i = 0; i < frame.length; i++) {
    windowed[i] = (frame[i] as number) * (w[i] as number);
    sumW += w[i] as number;
  }
  precondition(sumW !== 0, fn, 'window samples sum to zero');
  const buffer = new Float64Array(fftSize);
  if ((options.placement ?? 'zero-phase') === 'zero-phase') placeZeroPhase(windowed, buffer);
  else buffer.set(windowed);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buffer, re, im);
  const magnitude = new Float64Array(plan.bins);
  const last = plan.bins - 1;
  for (let k = 0; k <= last; k++) {
    const scale = (k === 0 || k === last ? 1 : 2) / sumW;
    re[k] = (re[k] as number) * scale;
    im[k] = (im[k] as number) * scale;
    magnitude[k] = Math.hypot(re[k] as number, im[k] as number);
  }
  return { sampleRate, fftSize, binHz: sampleRate / fftSize, re, im, magnitude };
}

/**
 * Phase angle atan2(im, re) per bin, radians in (−π, π].
 * @throws RangeError on length mismatch
 */
export function phaseOf(re: Float64Array, im: Float64Array, output: Float64Array = new Float64Array(re.length)): Float64Array {
  precondition(re.length === im.length && output.length === re.length, 'phaseOf', 're, im and output must have equal lengths');
  for (let k = 0; k < re.length; k++) output[k] = Math.atan2(im[k] as number, re[k] as number);
  return output;
}
