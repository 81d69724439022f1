import type { SeededRandom } from './seeded-random.js';
import { scaleToRms } from './white-noise.js';
import { EngineInputError } from '../util/engine-input-error.js';

/** Lowest pole of the pinking filter (Hz); below it the spectrum turns flat. */
export const PINK_LOWEST_POLE_HZ = 5;
/** Pole/zero pairs per decade: 3 keeps the ripple around the −3 dB/octave line small. */
const SECTIONS_PER_DECADE = 3;

/** One first-order section y[n] = x[n] − z·x[n−1] + p·y[n−1]. */
interface Section {
  zero: number;
  pole: number;
}

/**
 * The pinking filter for a sample rate: first-order sections whose real poles sit at
 * f_k = 5 Hz·10^(k/3) and zeros half a step higher (f_k·10^(1/6)), up to the Nyquist
 * frequency. Between a pole and its zero the slope is −20 dB/decade, between a zero and the
 * next pole 0 dB/decade; interleaved at equal log spacing they average −10 dB/decade, i.e.
 * −3 dB/octave of power (the pole–zero approximation of a 1/f spectrum; M. S. Keshner,
 * "1/f noise", Proc. IEEE 70(3), 1982 (from memory)). Analog poles map to z = e^{−2π·f/fs}
 * (matched z-transform), so the design follows the sample rate.
 */
export function pinkingSections(sampleRate: number): Section[] {
  const sections: Section[] = [];
  const step = 10 ** (1 / SECTIONS_PER_DECADE);
  for (let f = PINK_LOWEST_POLE_HZ; f < sampleRate / 2; f *= step) {
    const fz = f * Math.sqrt(step);
    sections.push({ pole: Math.exp((-2 * Math.PI * f) / sampleRate), zero: Math.exp((-2 * Math.PI * fz) / sampleRate) });
  }
  return sections;
}

/**
 * Pink noise: seeded Gaussian white noise through the pinking filter, after a warm-up of ten
 * time constants of the lowest pole (so the output starts in its steady state), scaled so its
 * RMS over the `frames` samples is exactly `rms`. Power spectral density falls 3 dB per
 * octave from about 5 Hz up to the top octave below fs/2.
 *
 * @throws RangeError when frames is not a positive whole number or rms is negative.
 */
export function pinkNoise(frames: number, sampleRate: number, rms: number, random: SeededRandom): Float64Array {
  if (!Number.isInteger(frames) || frames < 1) throw new EngineInputError('pinkNoise', 'frames must be a positive whole number');
  if (!(rms >= 0)) throw new EngineInputError('pinkNoise', 'rms must be 0 or more');
  const sections = pinkingSections(sampleRate);
  const warmUp = Math.ceil((10 * sampleRate) / (2 * Math.PI * PINK_LOWEST_POLE_HZ));
  const xPrev = new Float64Array(sections.length);
  const yPrev = new Float64Array(sections.length);
  const out = new Float64Array(frames);
  for (let n = -warmUp; n < frames; n++) {
    let x = random.nextGaussian();
    for (let s = 0; s < sections.length; s++) {
      const sec = sections[s] as Section;
      const y = x - sec.zero * (xPrev[s] as number) + sec.pole * (yPrev[s] as number);
      xPrev[s] = x;
      yPrev[s] = y;
      x = y;
    }
    if (n >= 0) out[n] = x;
  }
  return scaleToRms(out, rms);
}
