import { precondition, requirePositive } from '../util/preconditions.js';
import { measureLatency } from './latency.js';
import { loudestStretch } from './loudest-stretch.js';

/** Options of `measureClockDrift`. */
export interface ClockDriftOptions {
  /** Length of each of the two segments compared, in seconds (default 0.5). */
  segmentSeconds?: number;
  /** Records whose segments are closer than this (centre to centre, seconds) give null (default 2). */
  minSpanSeconds?: number;
  /** Largest drift searched in ppm (default 1000). */
  maxPpm?: number;
  /** Whole-record latency if already known; measured otherwise. */
  latencySamples?: number;
}

/** Clock drift between a stimulus and its capture. */
export interface ClockDrift {
  /**
   * Drift in parts per million: how much faster the capture's clock ran than the stimulus's.
   * +50 means 1 000 050 capture samples per 1 000 000 stimulus samples (the latency grows).
   */
  ppm: number;
  /** Sub-sample latency at the centre of the first and of the last segment. */
  firstLatency: number;
  lastLatency: number;
  /** Stimulus samples between the two segment centres. */
  spanSamples: number;
}

/** Segments quieter than this fraction of the whole stimulus's mean power are not used (−40 dB). */
const MIN_SEGMENT_POWER = 1e-4;

/**
 * Clock drift from the change of sub-sample latency between an early and a late segment of the
 * stimulus: ppm = 10⁶·(d_last − d_first)/(centre_last − centre_first). Each segment (the loudest
 * `segmentSeconds` in the first and in the last quarter of the stimulus) is found in the capture by
 * GCC-PHAT around the whole-record latency. With ±0.02-sample latencies over 9 s at 48 kHz the
 * resolution is about 0.1 ppm.
 * Returns null when the record is too short (`minSpanSeconds`), a segment is silent or its latency
 * is ambiguous, or a segment falls outside the capture.
 * @throws RangeError on a bad sample rate or option
 * @see C. H. Knapp, G. C. Carter, IEEE Trans. ASSP 24(4), 1976 (delay estimation per segment);
 *   linear drift model: common practice (a constant rate offset makes the delay a linear ramp)
 */
export function measureClockDrift(stimulus: Float64Array, capture: Float64Array, sampleRate: number, options: ClockDriftOptions = {}): ClockDrift | null {
  const fn = 'measureClockDrift';
  requirePositive(sampleRate, fn, 'sampleRate');
  const segmentSeconds = options.segmentSeconds ?? 0.5;
  const minSpanSeconds = options.minSpanSeconds ?? 2;
  const maxPpm = options.maxPpm ?? 1000;
  requirePositive(segmentSeconds, fn, 'segmentSeconds');
  requirePositive(maxPpm, fn, 'maxPpm');
  precondition(minSpanSeconds >= 0, fn, `minSpanSeconds must be ≥ 0 (got ${minSpanSeconds})`);
  const n = stimulus.length;
  const segment = Math.min(Math.round(segmentSeconds * sampleRate), Math.floor(n / 4));
  if (segment < 64 || capture.length < 64) return null;
  const firstStart = loudestStretch(stimulus, segment, 0, Math.floor(n / 4));
  const lastStart = loudestStretch(stimulus, segment, n - Math.floor(n / 4), n);
  const spanSamples = lastStart - firstStart;
  if (spanSamples < minSpanSeconds * sampleRate || spanSamples <= 0) return null;

  let total = 0;
  for (let i = 0; i < n; i++) total += (stimulus[i] as number) ** 2;
  const meanPower = total / n;
  const power = (start: number): number => {
    let e = 0;
    for (let i = start; i < start + segment; i++) e += (stimulus[i] as number) ** 2;
    return e / segment;
  };
  if (!(meanPower > 0) || power(firstStart) < MIN_SEGMENT_POWER * meanPower || power(lastStart) < MIN_SEGMENT_POWER * meanPower) return null;

  let latency = options.latencySamples;
  if (latency === undefined) {
    // Coarse latency from the first segment alone: over the whole record a drift smears the
    // correlation peak across ppm·N·10⁻⁶ lags (24 at 50 ppm over 10 s at 48 kHz).
    const coarse = measureLatency(stimulus.subarray(firstStart, firstStart + segment), capture);
    if (coarse.ambiguous || coarse.confidence === 0) return null;
    latency = coarse.samples - firstStart;
  }
  precondition(Number.isFinite(latency), fn, `latencySamples must be finite (got ${latency})`);
  // The last segment may sit up to maxPpm·n·10⁻⁶ samples away from the first one's latency.
  const margin = Math.ceil(maxPpm * 1e-6 * n) + 16;
  const segmentLatency = (start: number): number | null => {
    const centre = Math.round(start + (latency as number));
    const from = centre - margin;
    const to = centre + segment + margin;
    if (from < 0 || to > capture.length) return null;
    const estimate = measureLatency(stimulus.subarray(start, start + segment), capture.subarray(from, to), { minSamples: 0, maxSamples: 2 * margin });
    if (estimate.ambiguous || estimate.confidence === 0) return null;
    return estimate.samples + from - start;
  };
  const firstLatency = segmentLatency(firstStart);
  const lastLatency = segmentLatency(lastStart);
  if (firstLatency === null || lastLatency === null) return null;
  return { ppm: ((lastLatency - firstLatency) / spanSamples) * 1e6, firstLatency, lastLatency, spanSamples };
}
