import { welchCrossSpectrum } from '../spectrum/welch.js';
import { precondition, requireFinite, requirePositive } from '../util/preconditions.js';

/** Options of `coherence`. */
export interface CoherenceOptions {
  /** Welch segment length, a power of two (default 8192, halved until it fits the signals). */
  segmentLength?: number;
  /** Overlap in samples (default segmentLength/2). */
  overlap?: number;
}

/** Magnitude-squared coherence per bin of a Welch analysis. */
export interface CoherenceResult {
  binHz: number;
  /** γ²(f) = |Gxy|²/(Gxx·Gyy) ∈ [0, 1]; 0 where either auto spectrum is 0. */
  gamma2: Float64Array;
  /** Gxx, the reference's auto spectrum (density, units²/Hz), for choosing the bins that carry stimulus. */
  referencePower: Float64Array;
  /** Number of averaged segments (the estimate's bias is about (1 − γ²)²/segments). */
  segments: number;
}

/**
 * Magnitude-squared coherence between a reference (the stimulus) and a capture aligned to it
 * (remove the bulk delay first, e.g. with `estimateLatency`: a lag comparable to the segment
 * length lowers γ² by about (1 − lag/segment)²). γ² = 1 for a noiseless linear path and
 * SNR/(1 + SNR) with uncorrelated noise at the output, so 1 − γ² is the fraction of the capture's
 * power per bin that the stimulus does not explain (noise, distortion, time variance).
 * Segments are Hann-windowed without detrending, as in `estimateTransferFunction`'s H1.
 * @throws RangeError when lengths differ, the signals are shorter than 16 samples or not finite,
 *   or on bad options
 * @see J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., Wiley 2010, §9.2 (ordinary
 *   coherence, its estimate from averaged spectra, and its bias); P. D. Welch, IEEE Trans. Audio
 *   Electroacoust. 15(2), 1967 (averaged spectra); same estimator as scipy.signal.coherence
 */
export function coherence(reference: Float64Array, capture: Float64Array, sampleRate: number, options: CoherenceOptions = {}): CoherenceResult {
  const fn = 'coherence';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(reference.length === capture.length, fn, `reference and capture must have equal lengths (got ${reference.length}, ${capture.length})`);
  precondition(reference.length >= 16, fn, `signals must hold at least 16 samples (got ${reference.length})`);
  requireFinite(reference, fn, 'reference');
  requireFinite(capture, fn, 'capture');
  let segmentLength = options.segmentLength ?? 8192;
  if (options.segmentLength === undefined) while (segmentLength > reference.length) segmentLength /= 2;
  const cross = welchCrossSpectrum(reference, capture, sampleRate, { segmentLength, overlap: options.overlap ?? segmentLength / 2, detrend: 'none' });
  const gamma2 = new Float64Array(cross.re.length);
  for (let k = 0; k < gamma2.length; k++) {
    const d = (cross.pxx[k] as number) * (cross.pyy[k] as number);
    // Rounding can lift |Gxy|² a hair above Gxx·Gyy for a noiseless path: clamp to 1.
    gamma2[k] = d > 0 ? Math.min(1, ((cross.re[k] as number) ** 2 + (cross.im[k] as number) ** 2) / d) : 0;
  }
  return { binHz: cross.binHz, gamma2, referencePower: cross.pxx, segments: cross.segments };
}

/** The lowest coherence in a band and where it occurs. */
export interface MinimumCoherence {
  gamma2: number;
  atHz: number;
  /** Bins examined (those in the band with stimulus energy). */
  bins: number;
}

/**
 * Smallest γ² over the bins of [lowHz, highHz] where the reference carries energy (Gxx at least
 * `relativeThreshold` times its largest value, default 1e-6 = −60 dB, the threshold
 * `estimateTransferFunction` uses): bins without stimulus have no meaningful coherence.
 * @returns null when no bin qualifies
 * @throws RangeError on a band with lowHz > highHz or a threshold outside (0, 1]
 * @see J. S. Bendat, A. G. Piersol, "Random Data", 4th ed., §9.2
 */
export function minimumCoherence(result: CoherenceResult, lowHz: number, highHz: number, relativeThreshold = 1e-6): MinimumCoherence | null {
  const fn = 'minimumCoherence';
  precondition(lowHz <= highHz, fn, `lowHz must not exceed highHz (got ${lowHz}…${highHz})`);
  precondition(relativeThreshold > 0 && relativeThreshold <= 1, fn, `relativeThreshold must lie in (0, 1] (got ${relativeThreshold})`);
  let max = 0;
  for (const p of result.referencePower) if (p > max) max = p;
  if (!(max > 0)) return null;
  const floor = relativeThreshold * max;
  let best: MinimumCoherence | null = null;
  let bins = 0;
  for (let k = 0; k < result.gamma2.length; k++) {
    const f = k * result.binHz;
    if (f < lowHz || f > highHz || (result.referencePower[k] as number) < floor) continue;
    bins++;
    const g = result.gamma2[k] as number;
    if (best === null || g < best.gamma2) best = { gamma2: g, atHz: f, bins: 0 };
  }
  return best === null ? null : { ...best, bins };
}
