import { precondition, requirePositive } from '../util/preconditions.js';
import { resolveToneRange } from './imd-steady-range.js';
import { fitSinusoids } from './imd-tone-fit.js';
import { findStrongestTones, refineTwoToneFrequencies } from './imd-tone-search.js';

/** Options of `measureImdTwinTone`. */
export interface ImdTwinToneOptions {
  /** Lower tone f1 (Hz), a start value refined by a sine fit; default: found in the spectrum. */
  lowHz?: number;
  /** Upper tone f2 (Hz), likewise. */
  highHz?: number;
  /** Samples [start, end) to analyse; default `steadyToneRange` (skips lead-in and fades). */
  range?: readonly [number, number];
  /** Lowest frequency the tone search considers (default 10 Hz). */
  minHz?: number;
}

/** One intermodulation product. */
export interface ImdProduct {
  frequencyHz: number;
  /** Peak amplitude; null when the frequency is not inside (0, fs/2). */
  amplitude: number | null;
}

/** Twin-tone (difference-frequency) intermodulation of one channel. */
export interface ImdTwinToneResult {
  /** Measured f1 < f2 (sine fits), Hz. */
  lowHz: number;
  highHz: number;
  lowAmplitude: number;
  highAmplitude: number;
  /** Second-order product at f2 − f1. */
  difference: ImdProduct;
  /** Third-order products at 2f1 − f2 and 2f2 − f1. */
  thirdLower: ImdProduct;
  thirdUpper: ImdProduct;
  /** d2 = 100·A(f2 − f1)/(A(f1) + A(f2)) %. */
  d2Percent: number;
  d2Db: number;
  /** d3 = 100·(A(2f1 − f2) + A(2f2 − f1))/(A(f1) + A(f2)) %. */
  d3Percent: number;
  d3Db: number;
  /** The samples analysed, [start, end). */
  range: [number, number];
}

/**
 * Twin-tone difference-frequency distortion (DFD). Two tones f1 < f2 are found (or taken as
 * start values) and refined by four-parameter sine fits; one joint least-squares fit at
 * f1, f2, f2 − f1, 2f1 − f2 and 2f2 − f1 gives the amplitudes, and
 *   d2 = A(f2 − f1) / (A(f1) + A(f2)),
 *   d3 = (A(2f1 − f2) + A(2f2 − f1)) / (A(f1) + A(f2)),
 * i.e. each product relative to the arithmetic sum of the two tone amplitudes (the peak of
 * the two-tone signal). That reference and the arithmetic sum of the two third-order
 * products are the IEC 60268-3 difference-frequency distortion definitions as recalled
 * (from memory, not checked against the text; IEC 60118 uses the same signal).
 * @throws RangeError on a bad rate, options or range, or when two tones cannot be found
 * @see IEC 60268-3:2013, difference-frequency distortion (from memory); IEC 60118 (hearing
 *   aids, DFD); IEEE Std 1241-2010 §4.1.4 (least-squares sine fits)
 */
export function measureImdTwinTone(x: Float64Array, sampleRate: number, options: ImdTwinToneOptions = {}): ImdTwinToneResult {
  const fn = 'measureImdTwinTone';
  requirePositive(sampleRate, fn, 'sampleRate');
  const range = resolveToneRange(fn, x, sampleRate, options.range);
  const rec = x.subarray(range[0], range[1]);
  let guessLow = options.lowHz;
  let guessHigh = options.highHz;
  if (guessLow === undefined || guessHigh === undefined) {
    const [a, b] = findStrongestTones(rec, sampleRate, 2, options.minHz ?? 10) as [number, number];
    guessLow ??= Math.min(a, b);
    guessHigh ??= Math.max(a, b);
  }
  precondition(guessLow > 0 && guessLow < guessHigh && guessHigh < sampleRate / 2, fn, `need 0 < f1 < f2 < fs/2 (got ${guessLow} Hz, ${guessHigh} Hz)`);
  const [f1, f2] = refineTwoToneFrequencies(rec, sampleRate, guessLow, guessHigh);
  const limit = sampleRate / 2 - (2 * sampleRate) / rec.length;
  const products = [f2 - f1, 2 * f1 - f2, 2 * f2 - f1];
  const fitted = products.filter((f) => f > 0 && f < limit);
  const fit = fitSinusoids(rec, sampleRate, [f1, f2, ...fitted]);
  const a1 = fit.components[0]?.amplitude ?? 0;
  const a2 = fit.components[1]?.amplitude ?? 0;
  const reference = a1 + a2;
  precondition(reference > 0, fn, 'the two tones have no amplitude');
  const product = (f: number): ImdProduct => {
    const i = fitted.indexOf(f);
    return { frequencyHz: f, amplitude: i < 0 ? null : (fit.components[2 + i]?.amplitude ?? null) };
  };
  const [difference, thirdLower, thirdUpper] = products.map(product) as [ImdProduct, ImdProduct, ImdProduct];
  const d2 = (difference.amplitude ?? 0) / reference;
  const d3 = ((thirdLower.amplitude ?? 0) + (thirdUpper.amplitude ?? 0)) / reference;
  return {
    lowHz: f1,
    highHz: f2,
    lowAmplitude: a1,
    highAmplitude: a2,
    difference,
    thirdLower,
    thirdUpper,
    d2Percent: 100 * d2,
    d2Db: 20 * Math.log10(d2),
    d3Percent: 100 * d3,
    d3Db: 20 * Math.log10(d3),
    range,
  };
}
