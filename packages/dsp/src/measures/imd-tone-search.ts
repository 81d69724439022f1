import { createRealFftPlan } from '../fft/real-fft.js';
import { refinePeak } from '../spectrum/peak.js';
import { createWindow } from '../spectrum/windows.js';
import { precondition, requirePositive } from '../util/preconditions.js';
import { fitSineFourParameter } from './sine-fit.js';
import { fitSinusoids, subtractSinusoids } from './imd-tone-fit.js';

/** Longest stretch of the record the peak search transforms. */
const SEARCH_LENGTH = 2 ** 18;
/**
 * Longest stretch the frequency fits use (2.7 s at 192 kHz). NOTE: the frequency error of a
 * fit over N samples falls as N^(−3/2) (IEEE 1241 §4.1.4.3), so 2^19 samples already pin a
 * tone to far below what costs the amplitude fit over the full record anything; this bounds
 * the Gauss–Newton iterations to O(2^19) each.
 */
const REFINE_LENGTH = 2 ** 19;

/**
 * Frequencies of the `count` strongest spectral peaks above `minHz`, strongest first, from a
 * Blackman-Harris windowed (−92 dB side lobes), twice zero-padded FFT of up to 2^18 samples
 * from the middle of the record, refined by parabolic interpolation. After each pick its
 * main lobe (±4 bins of the unpadded transform) and `minSeparationHz` around it are excluded,
 * so a strong tone's skirt is not taken for a second tone. Accuracy: a small fraction of a
 * bin, enough to start a four-parameter sine fit.
 * @throws RangeError on a record shorter than 64 samples, a bad rate, or when fewer than
 *   `count` peaks exist above minHz
 * @see F. J. Harris, Proc. IEEE 66(1), 1978 (4-term Blackman-Harris); E. Jacobsen,
 *   P. Kootsookos, IEEE Signal Processing Magazine 24(3), 2007 (parabolic interpolation)
 */
export function findStrongestTones(x: Float64Array, sampleRate: number, count: number, minHz = 10, minSeparationHz = 0): number[] {
  const fn = 'findStrongestTones';
  precondition(x.length >= 64, fn, `record must hold at least 64 samples (got ${x.length})`);
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(Number.isInteger(count) && count >= 1, fn, `count must be a whole number ≥ 1 (got ${count})`);
  let length = 1;
  while (length * 2 <= Math.min(x.length, SEARCH_LENGTH)) length *= 2;
  const offset = Math.floor((x.length - length) / 2);
  const window = createWindow('blackman-harris', length, 'periodic');
  const plan = createRealFftPlan(2 * length);
  const buffer = new Float64Array(plan.size);
  for (let i = 0; i < length; i++) buffer[i] = (x[offset + i] as number) * (window[i] as number);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buffer, re, im);
  const magnitude = new Float64Array(plan.bins);
  for (let k = 0; k < plan.bins; k++) magnitude[k] = Math.hypot(re[k] as number, im[k] as number);
  const binHz = sampleRate / plan.size;
  const excluded = new Uint8Array(plan.bins);
  const guard = 8 + Math.ceil(minSeparationHz / binHz); // 4 unpadded bins = 8 padded bins
  const first = Math.max(1, Math.ceil(minHz / binHz));
  const found: number[] = [];
  while (found.length < count) {
    let best = -1;
    for (let k = first; k < plan.bins - 1; k++) {
      if (excluded[k] === 0 && (best < 0 || (magnitude[k] as number) > (magnitude[best] as number))) best = k;
    }
    precondition(best >= 0 && (magnitude[best] as number) > 0, fn, `found only ${found.length} of ${count} tones above ${minHz} Hz`);
    found.push(refinePeak(magnitude, best).bin * binHz);
    for (let k = Math.max(0, best - guard); k <= Math.min(plan.bins - 1, best + guard); k++) excluded[k] = 1;
  }
  return found;
}

/**
 * Refines the frequencies of two simultaneous tones by four-parameter sine fits, each on the
 * record with the other tone removed (three-parameter fit, then subtraction), so neither
 * biases the other: A first (on the raw record), then B on x − A, then A again on x − B.
 * Only the middle 2^19 samples of a longer record are used.
 * @param guessA, guessB start frequencies within about half a DFT bin of the record
 * @returns the refined frequencies [f_A, f_B]
 * @throws RangeError when a fit diverges or on bad arguments
 * @see IEEE Std 1241-2010 §4.1.4.3 (four-parameter fit)
 */
export function refineTwoToneFrequencies(x: Float64Array, sampleRate: number, guessA: number, guessB: number): [number, number] {
  const fn = 'refineTwoToneFrequencies';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(guessA !== guessB, fn, `the two start frequencies must differ (got ${guessA} Hz twice)`);
  if (x.length > REFINE_LENGTH) {
    const from = Math.floor((x.length - REFINE_LENGTH) / 2);
    return refineTwoToneFrequencies(x.subarray(from, from + REFINE_LENGTH), sampleRate, guessA, guessB);
  }
  const without = (f: number): Float64Array => subtractSinusoids(Float64Array.from(x), sampleRate, fitSinusoids(x, sampleRate, [f]));
  let fa = fitSineFourParameter(x, sampleRate, guessA).frequencyHz;
  const fb = fitSineFourParameter(without(fa), sampleRate, guessB).frequencyHz;
  fa = fitSineFourParameter(without(fb), sampleRate, fa).frequencyHz;
  return [fa, fb];
}
