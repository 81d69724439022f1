import { precondition, requirePositive } from '../util/preconditions.js';
import { resolveToneRange } from './imd-steady-range.js';
import { fitSinusoids } from './imd-tone-fit.js';
import { findStrongestTones, refineTwoToneFrequencies } from './imd-tone-search.js';

/** Options of `measureImdSmpte`. */
export interface ImdSmpteOptions {
  /** Low tone f1 (Hz), a start value refined by a sine fit; default: found in the spectrum. */
  lowHz?: number;
  /** High tone f2 (Hz), likewise. */
  highHz?: number;
  /** Highest sideband order n counted in f2 ± n·f1 (default 4). */
  orders?: number;
  /** Samples [start, end) to analyse; default `steadyToneRange` (skips lead-in and fades). */
  range?: readonly [number, number];
  /** Lowest frequency the tone search considers (default 10 Hz). */
  minHz?: number;
}

/** The sideband pair of order n around f2. */
export interface ImdSidebandPair {
  order: number;
  lowerHz: number;
  upperHz: number;
  /** Peak amplitude at f2 − n·f1; null when that frequency is not above 0 Hz. */
  lowerAmplitude: number | null;
  /** Peak amplitude at f2 + n·f1; null when it is not below fs/2. */
  upperAmplitude: number | null;
  /** 100·(A₋ + A₊)/A_f2: the order-n modulation distortion as IEC 60268-3 defines it (from memory). */
  percent: number;
}

/** SMPTE/DIN intermodulation of one channel. */
export interface ImdSmpteResult {
  /** Measured f1 and f2 (sine fits), Hz. */
  lowHz: number;
  highHz: number;
  /** Peak amplitudes of the two tones (full scale = 1). */
  lowAmplitude: number;
  highAmplitude: number;
  sidebands: ImdSidebandPair[];
  /** 100·√(Σ_n A²_{f2−nf1} + A²_{f2+nf1})/A_f2. */
  imdPercent: number;
  /** 20·log10(imdPercent/100). */
  imdDb: number;
  /** The samples analysed, [start, end). */
  range: [number, number];
}

/**
 * SMPTE / DIN intermodulation distortion: the two tones' frequencies are found (or taken as
 * start values) and refined by four-parameter sine fits; then one joint least-squares fit at
 * the exact frequencies f1, 2f1, 3f1, f2 and f2 ± n·f1 (n = 1…orders) gives every amplitude
 * without window leakage or scalloping, and
 *   IMD = 100·√(Σ_{n=1…N} (A²_{f2−n·f1} + A²_{f2+n·f1})) / A_{f2}  %.
 * This is the spectral (root-sum-square) form; the per-order arithmetic sums
 * (A₋ + A₊)/A_f2, which IEC 60268-3 calls modulation distortion of order n+1 (from memory),
 * are reported per pair. A sideband that lands within one bin of a harmonic of f1 (DIN:
 * 8 kHz = 32 × 250 Hz) cannot be separated from it and includes it.
 * @throws RangeError on a bad rate, options or range, or when two tones cannot be found
 * @see IEC 60268-3:2013, intermodulation (modulation) distortion, §15.2 per the Earmark brief
 *   (clause number from memory); SMPTE RP120 (60 Hz + 7 kHz, 4:1); DIN 45403 (250 Hz + 8 kHz);
 *   IEEE Std 1241-2010 §4.1.4 (least-squares sine fits)
 */
export function measureImdSmpte(x: Float64Array, sampleRate: number, options: ImdSmpteOptions = {}): ImdSmpteResult {
  const fn = 'measureImdSmpte';
  requirePositive(sampleRate, fn, 'sampleRate');
  const orders = options.orders ?? 4;
  precondition(Number.isInteger(orders) && orders >= 1 && orders <= 10, fn, `orders must be a whole number 1…10 (got ${orders})`);
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
  // The stronger tone (f1 at 4:1) is fitted first.
  const [f1, f2] = refineTwoToneFrequencies(rec, sampleRate, guessLow, guessHigh);
  const limit = sampleRate / 2 - (2 * sampleRate) / rec.length;
  const inBand = (f: number): boolean => f > 0 && f < limit;
  const freqs = [f1, f2];
  for (let h = 2; h <= 3; h++) if (inBand(h * f1)) freqs.push(h * f1);
  const index = new Map<string, number>();
  for (let n = 1; n <= orders; n++) {
    for (const [key, f] of [[`-${n}`, f2 - n * f1], [`+${n}`, f2 + n * f1]] as const) {
      if (!inBand(f)) continue;
      index.set(key, freqs.length);
      freqs.push(f);
    }
  }
  const fit = fitSinusoids(rec, sampleRate, freqs);
  const amp = (i: number | undefined): number | null => (i === undefined ? null : (fit.components[i]?.amplitude ?? null));
  const a1 = fit.components[0]?.amplitude ?? 0;
  const a2 = fit.components[1]?.amplitude ?? 0;
  precondition(a2 > 0, fn, `no tone at f2 = ${f2} Hz`);
  const sidebands: ImdSidebandPair[] = [];
  let sumSquares = 0;
  for (let n = 1; n <= orders; n++) {
    const lower = amp(index.get(`-${n}`));
    const upper = amp(index.get(`+${n}`));
    sumSquares += (lower ?? 0) ** 2 + (upper ?? 0) ** 2;
    sidebands.push({ order: n, lowerHz: f2 - n * f1, upperHz: f2 + n * f1, lowerAmplitude: lower, upperAmplitude: upper, percent: (100 * ((lower ?? 0) + (upper ?? 0))) / a2 });
  }
  const imdPercent = (100 * Math.sqrt(sumSquares)) / a2;
  return { lowHz: f1, highHz: f2, lowAmplitude: a1, highAmplitude: a2, sidebands, imdPercent, imdDb: 20 * Math.log10(imdPercent / 100), range };
}
