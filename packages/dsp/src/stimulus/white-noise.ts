import type { SeededRandom } from './seeded-random.js';
import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Gaussian white noise: independent standard-normal samples from `random`, then scaled so
 * that the RMS over all `frames` samples is exactly `rms` (not only in expectation).
 *
 * @throws RangeError when frames is not a positive whole number or rms is negative.
 */
export function whiteNoise(frames: number, rms: number, random: SeededRandom): Float64Array {
  if (!Number.isInteger(frames) || frames < 1) throw new EngineInputError('whiteNoise', 'frames must be a positive whole number');
  if (!(rms >= 0)) throw new EngineInputError('whiteNoise', 'rms must be 0 or more');
  const out = new Float64Array(frames);
  for (let n = 0; n < frames; n++) out[n] = random.nextGaussian();
  return scaleToRms(out, rms);
}

/**
 * Scales `x` in place so its RMS is `rms`; returns it. A silent input stays silent.
 *
 * @throws RangeError when rms is negative.
 */
export function scaleToRms(x: Float64Array, rms: number): Float64Array {
  if (!(rms >= 0)) throw new EngineInputError('scaleToRms', 'rms must be 0 or more');
  let sum = 0;
  for (let n = 0; n < x.length; n++) sum += (x[n] as number) ** 2;
  const current = Math.sqrt(sum / Math.max(1, x.length));
  if (current === 0) return x;
  const g = rms / current;
  for (let n = 0; n < x.length; n++) x[n] = (x[n] as number) * g;
  return x;
}
