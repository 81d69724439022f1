import type { SeededRandom } from './seeded-random.js';
import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Schroeder's low-crest-factor phases for K equal-amplitude tones: φ_k = −π·k(k−1)/K,
 * k = 1 … K (M. R. Schroeder, "Synthesis of low-peak-factor signals and binary sequences
 * with low autocorrelation", IEEE Trans. Inf. Theory 16(1), 1970). Derived for harmonically
 * spaced tones; it still lowers the crest factor for other spacings, though less.
 *
 * @throws RangeError when K is not a positive whole number.
 */
export function schroederPhases(count: number): Float64Array {
  if (!Number.isInteger(count) || count < 1) throw new EngineInputError('schroederPhases', 'count must be a positive whole number');
  const phases = new Float64Array(count);
  for (let k = 1; k <= count; k++) phases[k - 1] = (-Math.PI * k * (k - 1)) / count;
  return phases;
}

/** Independent uniform phases in [0, 2π) drawn from `random`. */
export function randomPhases(count: number, random: SeededRandom): Float64Array {
  const phases = new Float64Array(count);
  for (let k = 0; k < count; k++) phases[k] = 2 * Math.PI * random.next();
  return phases;
}

/**
 * Tone frequencies from `from` to `to`: `count` of them, equally spaced on a log or a linear
 * axis (one tone: `from`).
 *
 * @throws RangeError when count < 1 or the edges are not positive.
 */
export function toneFrequencies(from: number, to: number, count: number, spacing: 'log' | 'linear'): Float64Array {
  if (!Number.isInteger(count) || count < 1) throw new EngineInputError('toneFrequencies', 'count must be a positive whole number');
  if (!(from > 0 && to > 0)) throw new EngineInputError('toneFrequencies', 'from and to must be positive');
  const out = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    const x = count === 1 ? 0 : k / (count - 1);
    out[k] = spacing === 'log' ? from * (to / from) ** x : from + (to - from) * x;
  }
  return out;
}

/** Samples recomputed exactly at every block start, so the rotation drifts by < 1e-12. */
const RESYNC = 1024;

/**
 * Σ_k a·cos(2π·f_k·n/fs + φ_k), n = 0 … frames − 1, all tones of amplitude a. Each tone is
 * advanced by a complex rotation (NOTE: one multiply-add per sample instead of a cos call)
 * and resynchronised to the exact phase every 1024 samples.
 *
 * @throws RangeError when the frequency and phase arrays differ in length.
 */
export function multitoneWave(
  frames: number,
  sampleRate: number,
  frequencies: Float64Array,
  phases: Float64Array,
  amplitude: number,
): Float64Array {
  if (frequencies.length !== phases.length) throw new EngineInputError('multitoneWave', 'one phase per frequency is needed');
  if (!Number.isInteger(frames) || frames < 0) throw new EngineInputError('multitoneWave', 'frames must be a whole number ≥ 0');
  const out = new Float64Array(frames);
  for (let k = 0; k < frequencies.length; k++) {
    const w = (2 * Math.PI * (frequencies[k] as number)) / sampleRate;
    const phi = phases[k] as number;
    const cw = Math.cos(w);
    const sw = Math.sin(w);
    for (let start = 0; start < frames; start += RESYNC) {
      let re = Math.cos(w * start + phi);
      let im = Math.sin(w * start + phi);
      const end = Math.min(frames, start + RESYNC);
      for (let n = start; n < end; n++) {
        out[n] = (out[n] as number) + amplitude * re;
        const r = re * cw - im * sw;
        im = re * sw + im * cw;
        re = r;
      }
    }
  }
  return out;
}
