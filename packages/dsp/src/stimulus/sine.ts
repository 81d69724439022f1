import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Samples of A·sin(2π·f·n/fs), n = 0 … frames − 1.
 *
 * @throws RangeError when frames is not a non-negative whole number or f is not in (0, fs/2).
 */
export function sineWave(frames: number, sampleRate: number, frequency: number, amplitude: number): Float64Array {
  if (!Number.isInteger(frames) || frames < 0) throw new EngineInputError('sineWave', 'frames must be a whole number ≥ 0');
  if (!(frequency > 0 && frequency < sampleRate / 2)) {
    throw new EngineInputError('sineWave', `a sine's frequency must lie between 0 and half the sample rate, ${sampleRate / 2} Hz (got ${frequency} Hz)`);
  }
  const out = new Float64Array(frames);
  const w = (2 * Math.PI * frequency) / sampleRate;
  for (let n = 0; n < frames; n++) out[n] = amplitude * Math.sin(w * n);
  return out;
}
