import { precondition } from '../util/preconditions.js';
import { type CorrelationWeighting, weightedCrossCorrelation } from './weighted-cross-correlation.js';

/** Options of `measureLatency`. */
export interface LatencyOptions {
  /** Smallest latency searched in samples (default −(stimulus length − 1)). */
  minSamples?: number;
  /** Largest latency searched in samples (default capture length − 1). */
  maxSamples?: number;
  /** Cross-spectrum weighting (default `phat`). */
  weighting?: CorrelationWeighting;
  /**
   * A second correlation peak within this many dB of the first makes the result ambiguous
   * (default 6 dB). A stimulus repeated K times in a capture of its own length gives neighbour
   * peaks (K − 1)/K as high, 20·log10(K/(K − 1)) ≤ 6.02 dB down for every K ≥ 2; a non-periodic
   * broadband stimulus gives none closer than the −13 dB first side lobe of a band-limited peak.
   */
  ambiguityDb?: number;
}

/** Latency of a capture against its stimulus. */
export interface LatencyEstimate {
  /** Latency in samples (fractional): capture[n + samples] ≈ ±stimulus[n]. */
  samples: number;
  /** Sign of the correlation peak: `inverted` when the path flips polarity. */
  polarity: 'normal' | 'inverted';
  /** Height of the correlation peak over the next peak outside its main lobe, in dB. */
  peakRatioDb: number;
  /** Normalised correlation coefficient at the latency (1: the capture is a scaled copy). */
  confidence: number;
  /** True when another lag correlates nearly as well (`ambiguityDb`): the latency is not unique. */
  ambiguous: boolean;
  /**
   * False when even the best lag correlates under `STIMULUS_FOUND_MIN_CORRELATION`: the capture
   * does not contain the stimulus, and `samples` is the position of noise, not a latency.
   */
  found: boolean;
  /** The competing latency (whole samples) when ambiguous, else null. */
  alternativeSamples: number | null;
  /** Plain-word problems found; empty when the estimate can be trusted. */
  warnings: string[];
}

/**
 * Below this |coefficient| at the best lag the stimulus counts as not found in the capture (a
 * loose, common-practice bound). Unrelated signals of N samples correlate at about 1/√N at any
 * one lag, so the best of the lags searched stays a few times that: 0.018 for a second of noise
 * against a second of white-noise stimulus; a capture holding the stimulus reads near 1, and
 * still 0.3 at 10 dB less signal than noise.
 */
export const STIMULUS_FOUND_MIN_CORRELATION = 0.1;

/** The sentence for a capture that does not contain its stimulus, with the figure that decided it. */
export function stimulusNotFoundMessage(coefficient: number): string {
  return (
    `The stimulus was not found in the capture: its best alignment correlates at ${Math.abs(coefficient).toFixed(3)}, under the ` +
    `${STIMULUS_FOUND_MIN_CORRELATION} a capture holding the stimulus reaches. Check that the device played this test case's stimulus and that this channel was recorded.`
  );
}

/**
 * Latency of `capture` against `stimulus` at sub-sample resolution with polarity and an
 * ambiguity check: GCC-PHAT over a linear (zero-padded) correlation, peak refined by band-limited
 * interpolation. Why the check: a periodic stimulus (a tone, a multitone, looped noise) correlates
 * equally well at every period, and with a capture as long as the stimulus the shortest lag has
 * the largest overlap, so the plain peak picks the wrong period (a 1 kHz tone at 48 kHz delayed
 * by 100 samples peaks at lag 4) — that case is flagged `ambiguous` with a warning.
 * Silent inputs return 0 with a warning instead of throwing.
 * @throws RangeError on empty inputs or an empty search range
 * @see C. H. Knapp, G. C. Carter, IEEE Trans. ASSP 24(4), 1976 (GCC-PHAT)
 */
export function measureLatency(stimulus: Float64Array, capture: Float64Array, options: LatencyOptions = {}): LatencyEstimate {
  const fn = 'measureLatency';
  precondition(stimulus.length >= 1 && capture.length >= 1, fn, 'stimulus and capture must not be empty');
  const ambiguityDb = options.ambiguityDb ?? 6;
  precondition(ambiguityDb >= 0, fn, `ambiguityDb must be ≥ 0 (got ${ambiguityDb})`);
  const peak = weightedCrossCorrelation(stimulus, capture, {
    ...(options.minSamples !== undefined ? { minLag: options.minSamples } : {}),
    ...(options.maxSamples !== undefined ? { maxLag: options.maxSamples } : {}),
    weighting: options.weighting ?? 'phat',
  });
  if (!peak.valid) {
    return { samples: 0, polarity: 'normal', peakRatioDb: 0, confidence: 0, ambiguous: true, found: false, alternativeSamples: null, warnings: ['The stimulus or the capture is silent, so no latency can be measured.'] };
  }
  const found = Math.abs(peak.coefficient) >= STIMULUS_FOUND_MIN_CORRELATION;
  const ambiguous = peak.peakRatioDb < ambiguityDb;
  const estimate = {
    samples: peak.lag,
    polarity: peak.polarity,
    peakRatioDb: peak.peakRatioDb,
    confidence: Math.abs(peak.coefficient),
    ambiguous,
    found,
    alternativeSamples: ambiguous ? peak.secondLag : null,
  };
  // Without the stimulus, its lag, lead, period or polarity would describe noise: say only that.
  if (!found) return { ...estimate, warnings: [stimulusNotFoundMessage(peak.coefficient)] };
  const warnings: string[] = [];
  if (ambiguous) {
    warnings.push(
      `The latency is ambiguous: lag ${peak.secondLag} correlates within ${peak.peakRatioDb.toFixed(1)} dB of lag ${peak.integerLag}. ` +
        'The stimulus is periodic or narrow-band; use a sweep or non-repeating noise, or bound the search range.',
    );
  }
  // Half a sample of lead is within an aligned capture's interpolation error.
  if (peak.lag < -0.5) warnings.push(`The capture leads the stimulus by ${(-peak.lag).toFixed(2)} samples: the recording started late or the wrong stimulus was given.`);
  // With a periodic stimulus the sign of the chosen peak says nothing about polarity.
  if (peak.polarity === 'inverted' && !ambiguous) warnings.push('The capture is inverted in polarity relative to the stimulus.');
  return { ...estimate, warnings };
}
