import { sineWave } from './sine.js';
import { EngineInputError } from '../util/engine-input-error.js';

/** Peak amplitudes of the two tones of an intermodulation test signal. */
export interface TwoToneAmplitudes {
  low: number;
  high: number;
}

/**
 * Splits a combined peak P between a low and a high tone in the amplitude ratio r:1:
 * A_low = P·r/(r + 1), A_high = P/(r + 1), so A_low + A_high = P, the peak the sum reaches
 * when both tones crest together. r = 4 is the SMPTE/DIN ratio; r = 1 gives the twin tone.
 *
 * @throws RangeError when the peak is negative or the ratio is not a finite number > 0.
 * @see SMPTE RP120 and IEC 60268-3 (4:1 low:high two-tone signal for modulation
 *   distortion); DIN 45403 (from memory: 250 Hz + 8 kHz at 4:1)
 */
export function twoToneAmplitudes(peak: number, ratio: number): TwoToneAmplitudes {
  if (!(peak >= 0 && Number.isFinite(peak))) throw new EngineInputError('twoToneAmplitudes', `peak must be a finite number ≥ 0 (got ${peak})`);
  if (!(ratio > 0 && Number.isFinite(ratio))) throw new EngineInputError('twoToneAmplitudes', `ratio must be a finite number > 0 (got ${ratio})`);
  return { low: (peak * ratio) / (ratio + 1), high: peak / (ratio + 1) };
}

/**
 * A_low·sin(2π·f_low·n/fs) + A_high·sin(2π·f_high·n/fs), n = 0 … frames − 1: both tones
 * start at phase 0, so |x| never exceeds A_low + A_high.
 *
 * @throws RangeError when frames is not a whole number ≥ 0 or a frequency is not in (0, fs/2).
 * @see IEC 60268-3 (two-tone signals for modulation and difference-frequency distortion)
 */
export function twoToneWave(frames: number, sampleRate: number, lowHz: number, lowAmplitude: number, highHz: number, highAmplitude: number): Float64Array {
  const x = sineWave(frames, sampleRate, lowHz, lowAmplitude);
  const y = sineWave(frames, sampleRate, highHz, highAmplitude);
  for (let n = 0; n < frames; n++) x[n] = (x[n] as number) + (y[n] as number);
  return x;
}
