import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { argMax, refinePeak } from '../spectrum/peak.js';
import { createWindow } from '../spectrum/windows.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';
import { fitHarmonics, fitSineFourParameter, subtractHarmonics } from './sine-fit.js';

/** Default measurement band, 20 Hz … min(20 kHz, fs/2). @see AES17-2020 §5.2.5 (standard low-pass filter) */
export function defaultBand(sampleRate: number): [number, number] {
  return [20, Math.min(20000, sampleRate / 2)];
}

/**
 * Interpolated frequency of the largest peak of a Hann-windowed spectrum above `minHz`.
 * @param magnitude one-sided |X[k]| of a Hann-windowed, zero-padded FFT
 * @throws RangeError when the spectrum has no bin above minHz
 * @see Jacobsen & Kootsookos 2007 (parabolic interpolation)
 */
export function estimatePeakFrequency(magnitude: Float64Array, binHz: number, minHz: number): number {
  const fn = 'estimatePeakFrequency';
  requirePositive(binHz, fn, 'binHz');
  const from = Math.max(1, Math.ceil(minHz / binHz));
  precondition(from < magnitude.length - 1, fn, `no bins above ${minHz} Hz`);
  const k = argMax(magnitude, from, magnitude.length - 1);
  return refinePeak(magnitude, k).bin * binHz;
}

/** One-sided |X| of a Hann-windowed record zero-padded to the plan size. */
function hannMagnitude(x: Float64Array, plan: RealFftPlan): Float64Array {
  const w = createWindow('hann', x.length, 'periodic');
  const buf = new Float64Array(plan.size);
  for (let i = 0; i < x.length; i++) buf[i] = (x[i] as number) * (w[i] as number);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  const mag = new Float64Array(plan.bins);
  for (let k = 0; k < plan.bins; k++) mag[k] = Math.hypot(re[k] as number, im[k] as number);
  return mag;
}

/**
 * What remains of a record after removing DC, its dominant tone and the tone's harmonics 2…K,
 * fitted by least squares (the same four-parameter fit and joint harmonic fit as the tone
 * measures). A record without a tone is returned minus its mean. Used to let a person listen
 * to what the firmware added; measures use `measureToneDistortion`.
 * @throws RangeError on a record shorter than 64 samples or a bad rate
 * @see IEEE Std 1241-2010 §4.1.4 (sine fits, residual)
 */
export function harmonicResidual(x: Float64Array, sampleRate: number, harmonics = 10): Float64Array {
  const fn = 'harmonicResidual';
  precondition(x.length >= 64, fn, `record must hold at least 64 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  const residual = Float64Array.from(x);
  let mean = 0;
  for (const v of x) mean += v;
  mean /= x.length;
  try {
    const plan = createRealFftPlan(nextPowerOfTwo(x.length));
    const f0 = estimatePeakFrequency(hannMagnitude(x, plan), sampleRate / plan.size, 10);
    const freq = fitSineFourParameter(x, sampleRate, f0).frequencyHz;
    subtractHarmonics(residual, sampleRate, fitHarmonics(x, sampleRate, freq, harmonics));
  } catch {
    // No dominant tone (noise, silence): only the mean is removed.
    for (let i = 0; i < residual.length; i++) residual[i] = (residual[i] as number) - mean;
  }
  return residual;
}
