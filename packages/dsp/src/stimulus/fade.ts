import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Applies raised-cosine (half-Hann) fades in place: gain ½(1 − cos(π·n/F)) over the first F
 * samples and its mirror image over the last F' samples, so the first and last samples are 0
 * and the gain has no slope discontinuity where it reaches 1 (the Hann window's halves;
 * F. J. Harris, Proc. IEEE 66(1), 1978).
 *
 * @throws RangeError when a fade length is negative, not whole, or the fades overlap.
 */
export function applyFades(signal: Float64Array, fadeInSamples: number, fadeOutSamples: number): void {
  if (!Number.isInteger(fadeInSamples) || !Number.isInteger(fadeOutSamples) || fadeInSamples < 0 || fadeOutSamples < 0) {
    throw new EngineInputError('applyFades', 'fade lengths must be whole numbers of samples, 0 or more');
  }
  const n = signal.length;
  if (fadeInSamples + fadeOutSamples > n) throw new EngineInputError('applyFades', 'fades are longer than the signal');
  for (let i = 0; i < fadeInSamples; i++) {
    signal[i] = (signal[i] as number) * 0.5 * (1 - Math.cos((Math.PI * i) / fadeInSamples));
  }
  for (let i = 0; i < fadeOutSamples; i++) {
    const j = n - 1 - i;
    signal[j] = (signal[j] as number) * 0.5 * (1 - Math.cos((Math.PI * i) / fadeOutSamples));
  }
}
