import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { harmonicResidual } from '../measures/distortion.js';
import { createWindow, type WindowKind, type WindowSymmetry } from '../spectrum/windows.js';
import { extractZeroPhase, placeZeroPhase } from '../spectrum/zero-phase.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';

/** An unscaled one-sided spectrum with what is needed to synthesise the frame back. */
export interface FrameSpectrum {
  fftSize: number;
  frameLength: number;
  re: Float64Array;
  im: Float64Array;
  window: Float64Array;
  placement: 'zero-phase' | 'start';
}

/**
 * Analysis: window the frame, place it (zero-phase by default) in a zero-padded buffer and FFT.
 * @throws RangeError on an empty frame or an FFT size that is not a power of two ≥ its length
 * @see J. O. Smith III, "Spectral Audio Signal Processing" (zero-phase zero-padded analysis)
 */
export function analyzeFrame(frame: Float64Array, options: { window?: WindowKind; symmetry?: WindowSymmetry; fftSize?: number; placement?: 'zero-phase' | 'start'; plan?: RealFftPlan } = {}): FrameSpectrum {
  precondition(frame.length >= 1, 'analyzeFrame', 'frame must not be empty');
  const fftSize = options.fftSize ?? Math.max(2, nextPowerOfTwo(frame.length));
  const plan = options.plan ?? createRealFftPlan(fftSize);
  precondition(plan.size === fftSize && fftSize >= frame.length, 'analyzeFrame', `fftSize ${fftSize} must be ≥ the frame length ${frame.length} and match the plan`);
  const window = createWindow(options.window ?? 'rectangular', frame.length, options.symmetry ?? 'periodic');
  const windowed = frame.map((v, i) => v * (window[i] as number));
  const buf = new Float64Array(fftSize);
  const placement = options.placement ?? 'zero-phase';
  if (placement === 'zero-phase') placeZeroPhase(windowed, buf);
  else buf.set(windowed);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  return { fftSize, frameLength: frame.length, re, im, window, placement };
}

/**
 * Synthesis: inverse FFT, undo the placement, and divide by the window where it is non-zero
 * (samples under a zero of the window cannot be recovered and are returned as 0).
 * @throws RangeError on an inconsistent spectrum
 * @see definition of the inverse DFT (Oppenheim & Schafer §8.1)
 */
export function synthesizeFrame(spectrum: FrameSpectrum, plan: RealFftPlan = createRealFftPlan(spectrum.fftSize)): Float64Array {
  precondition(plan.size === spectrum.fftSize, 'synthesizeFrame', 'plan size must match the spectrum');
  const buf = new Float64Array(spectrum.fftSize);
  plan.inverse(spectrum.re, spectrum.im, buf);
  const frame = spectrum.placement === 'zero-phase' ? extractZeroPhase(buf, spectrum.frameLength) : buf.slice(0, spectrum.frameLength);
  for (let i = 0; i < frame.length; i++) {
    const w = spectrum.window[i] as number;
    frame[i] = w !== 0 ? (frame[i] as number) / w : 0;
  }
  return frame;
}

/** Options of `residualForListening`. */
export interface ResidualOptions {
  /** Remove DC, the fundamental and harmonics 2…K first (default true). */
  removeHarmonics?: boolean;
  harmonics?: number;
  /** Keep only this band (default 20 Hz … min(20 kHz, fs/2)). */
  bandHz?: readonly [number, number];
}

/**
 * What remains of a capture after removing its fundamental and harmonics (by least-squares
 * fit), band-limited by zeroing FFT bins outside the band, same length as the input — for a
 * person to listen to what failed. The brick-wall band limit is exact in the DFT domain and
 * rings in time; it is meant for listening, not for measuring.
 * @throws RangeError on an empty capture or a bad band
 * @see IEEE Std 1241-2010 §4.1.4 (fit residual)
 */
export function residualForListening(x: Float64Array, sampleRate: number, options: ResidualOptions = {}): Float64Array {
  const fn = 'residualForListening';
  precondition(x.length >= 64, fn, `capture must hold at least 64 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  const band = options.bandHz ?? [20, Math.min(20000, sampleRate / 2)];
  precondition(band[0] >= 0 && band[1] > band[0], fn, 'band must satisfy 0 ≤ low < high');
  const n = nextPowerOfTwo(x.length);
  const plan = createRealFftPlan(n);
  const residual = options.removeHarmonics === false ? Float64Array.from(x) : harmonicResidual(x, sampleRate, options.harmonics ?? 10);
  const buf = new Float64Array(n);
  buf.set(residual);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  const binHz = sampleRate / n;
  for (let k = 0; k < plan.bins; k++) {
    const f = k * binHz;
    if (f < band[0] || f > band[1]) {
      re[k] = 0;
      im[k] = 0;
    }
  }
  plan.inverse(re, im, buf);
  return buf.slice(0, x.length);
}
