import { precondition } from '../util/preconditions.js';
import { type LatencyEstimate, STIMULUS_FOUND_MIN_CORRELATION, measureLatency } from './latency.js';
import { loudestStretch } from './loudest-stretch.js';
import type { CorrelationWeighting } from './weighted-cross-correlation.js';

/** Options of `interChannelDelay`. */
export interface InterChannelOptions {
  /** Largest |delay| searched in samples (default 8192). */
  maxLagSamples?: number;
  /**
   * Longest stretch of channel a correlated (default 2^17 samples); longer records use their
   * most energetic stretch. NOTE: bounds the FFT size so eight 10 s channels at 192 kHz stay fast.
   */
  maxAnalysisSamples?: number;
  /** Default `phat`. */
  weighting?: CorrelationWeighting;
  /** See `LatencyOptions.ambiguityDb` (default 6 dB). */
  ambiguityDb?: number;
}

/**
 * Delay of channel b after channel a in samples (fractional; negative when b leads) with b's
 * polarity relative to a: GCC-PHAT of b against a over at most `maxAnalysisSamples` of a and
 * ±`maxLagSamples` around it. An inverted and delayed channel reads its delay and `inverted`
 * (plain |r| peak picking reads the delay but hides the sign).
 * @throws RangeError when lengths differ, a channel is empty or an option is not a whole number ≥ 1
 * @see C. H. Knapp, G. C. Carter, IEEE Trans. ASSP 24(4), 1976 (GCC-PHAT time-delay estimation)
 */
export function interChannelDelay(a: Float64Array, b: Float64Array, options: InterChannelOptions = {}): LatencyEstimate {
  const fn = 'interChannelDelay';
  precondition(a.length === b.length && a.length >= 1, fn, `channels must be non-empty and of equal length (got ${a.length}, ${b.length})`);
  const maxLag = Math.min(options.maxLagSamples ?? 8192, a.length - 1);
  const span = Math.min(options.maxAnalysisSamples ?? 2 ** 17, a.length);
  precondition(Number.isInteger(maxLag) && maxLag >= 0, fn, `maxLagSamples must be a whole number ≥ 1 (got ${options.maxLagSamples})`);
  precondition(Number.isInteger(span) && span >= 1, fn, `maxAnalysisSamples must be a whole number ≥ 1 (got ${options.maxAnalysisSamples})`);
  if (!a.some((v) => v !== 0) || !b.some((v) => v !== 0)) {
    return { samples: 0, polarity: 'normal', peakRatioDb: 0, confidence: 0, ambiguous: true, found: false, alternativeSamples: null, warnings: ['A channel is silent, so no inter-channel delay can be measured.'] };
  }
  const start = loudestStretch(a, span);
  const from = Math.max(0, start - maxLag);
  const to = Math.min(b.length, start + span + maxLag);
  const offset = start - from;
  const estimate = measureLatency(a.subarray(start, start + span), b.subarray(from, to), {
    minSamples: offset - maxLag,
    maxSamples: offset + maxLag,
    ...(options.weighting !== undefined ? { weighting: options.weighting } : {}),
    ...(options.ambiguityDb !== undefined ? { ambiguityDb: options.ambiguityDb } : {}),
  });
  const shift = (lag: number | null): number | null => (lag === null ? null : lag - offset);
  // measureLatency's "capture" and "stimulus" wording does not fit two channels; say it plainly.
  const warnings = estimate.found
    ? estimate.warnings.filter((w) => !w.startsWith('The capture leads'))
    : [`The two channels hardly resemble each other (best correlation ${estimate.confidence.toFixed(3)}, under ${STIMULUS_FOUND_MIN_CORRELATION}): the delay between them may be wrong.`];
  return { ...estimate, samples: estimate.samples - offset, alternativeSamples: shift(estimate.alternativeSamples), warnings };
}

/**
 * Delay and polarity of every channel relative to channel `referenceChannel` (default 0); the
 * reference's own entry is exactly 0, normal, confidence 1.
 * @throws RangeError when channels are missing, differ in length, or the reference index is out of range
 * @see `interChannelDelay`
 */
export function interChannelDelays(channels: readonly Float64Array[], options: InterChannelOptions & { referenceChannel?: number } = {}): LatencyEstimate[] {
  const ref = options.referenceChannel ?? 0;
  precondition(Number.isInteger(ref) && ref >= 0 && ref < channels.length, 'interChannelDelays', `referenceChannel must index one of the ${channels.length} channels (got ${ref})`);
  const a = channels[ref] as Float64Array;
  return channels.map((b, c) =>
    c === ref ? { samples: 0, polarity: 'normal', peakRatioDb: Infinity, confidence: 1, ambiguous: false, found: true, alternativeSamples: null, warnings: [] } : interChannelDelay(a, b, options),
  );
}
