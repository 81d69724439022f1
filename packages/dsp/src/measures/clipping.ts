import { precondition } from '../util/preconditions.js';

/** Options of `detectClipping`. */
export interface ClippingOptions {
  /** Shortest run of samples at the extreme that can count (default 2). */
  minRunLength?: number;
  /** Samples within this distance of the extreme count as at it (default 2⁻³³, a quarter LSB of 32-bit PCM). */
  tolerance?: number;
}

/** Clipping found in one channel. */
export interface ClippingReport {
  /** Samples inside clipped runs. */
  clippedSamples: number;
  /** Number of clipped runs (flat tops). */
  clippedRuns: number;
  /** Longest clipped run in samples (0 when none). */
  longestRun: number;
  /** The record's largest and smallest values (the levels runs are judged at). */
  maxValue: number;
  minValue: number;
  /** Samples with |x| > 1: over full scale, which a fixed-point output would clip. */
  overFullScaleSamples: number;
}

/** Word lengths tried when looking for the record's quantisation grid. */
const GRID_BITS = [8, 12, 16, 20, 24] as const;

/**
 * The quantisation step q of the record: 2^{1−b} for the shortest word length b (of 8, 12, 16, 20,
 * 24) whose grid holds every sample, else `tolerance` (a float record, or fixed point scaled by a
 * float gain, has no grid to find; there a flat top of exactly equal values is already unlikely).
 */
function quantisationStep(x: Float64Array, tolerance: number): number {
  for (const bits of GRID_BITS) {
    const scale = 2 ** (bits - 1);
    let onGrid = true;
    for (let i = 0; i < x.length && onGrid; i++) {
      const v = (x[i] as number) * scale;
      onGrid = v === Math.round(v);
    }
    if (onGrid) return 1 / scale;
  }
  return tolerance;
}

/**
 * Counts runs stuck at the extreme `extreme` (sign +1: the record's maximum, −1: its minimum) that
 * a smooth peak cannot explain. A smooth peak near a maximum is a parabola T − c·(n − n₀)²; if m
 * samples share one quantisation step q (true values within 2q of each other, allowing a clamped
 * top code), c ≤ 2q/((m − 1)/2)², so two samples beyond the run the signal can have fallen by at
 * most 2q·((m + 3)/(m − 1))² + q. A clipped waveform arrives at the limit with a slope and falls
 * much further; the run counts when both neighbours two samples out (those that exist) fall by
 * more than that bound. For m = 2 the bound is 51q, for m = 3 19q, for m ≥ 7 under 7q.
 */
function countRuns(x: Float64Array, extreme: number, sign: 1 | -1, minRun: number, tolerance: number, q: number, report: { samples: number; runs: number; longest: number }): void {
  const atExtreme = (i: number): boolean => sign * (extreme - (x[i] as number)) <= tolerance;
  let i = 0;
  while (i < x.length) {
    if (!atExtreme(i)) {
      i++;
      continue;
    }
    const start = i;
    while (i < x.length && atExtreme(i)) i++;
    const m = i - start;
    if (m < minRun) continue;
    const bound = m === 1 ? Infinity : 2 * q * ((m + 3) / (m - 1)) ** 2 + q;
    const drops: number[] = [];
    if (start - 2 >= 0) drops.push(sign * (extreme - (x[start - 2] as number)));
    if (i + 1 < x.length) drops.push(sign * (extreme - (x[i + 1] as number)));
    // A run with no neighbours (a constant record) shows no approach, so it cannot be judged.
    if (drops.length === 0 || !drops.every((d) => d > bound)) continue;
    report.samples += m;
    report.runs++;
    report.longest = Math.max(report.longest, m);
  }
}

/**
 * Clipping as flat tops: runs of ≥ `minRunLength` consecutive samples stuck at the record's
 * maximum or minimum (within `tolerance`) that are longer than a smooth peak could be at that
 * level, given the record's quantisation step (found from the sample grid; see `countRuns`). Works at any level and in any format, since it looks for
 * the shape, not a threshold: a flat top at 0.9 FS counts, a float record clipped at 1.5 counts,
 * and a clean 0 dBFS sine quantised to 16 bits, which touches its top code on one (or, for low
 * frequencies, a few) samples per peak, counts 0. A waveform with deliberate flat tops (a square
 * wave) reads as clipped. Over-full-scale float samples (|x| > 1) are counted separately.
 * @throws RangeError on a minRunLength below 2 or a negative tolerance
 * @see AES17-2020 §3 (full scale; a sine whose peak reaches full scale is 0 dBFS, not clipped);
 *   flat-top run detection: common practice; the smooth-peak bound is a closed form (Taylor
 *   expansion of a peak to second order)
 */
export function detectClipping(x: Float64Array, options: ClippingOptions = {}): ClippingReport {
  const fn = 'detectClipping';
  const minRun = options.minRunLength ?? 2;
  const tolerance = options.tolerance ?? 2 ** -33;
  precondition(Number.isInteger(minRun) && minRun >= 2, fn, `minRunLength must be a whole number ≥ 2 (got ${minRun})`);
  precondition(tolerance >= 0 && Number.isFinite(tolerance), fn, `tolerance must be finite and ≥ 0 (got ${tolerance})`);
  let maxValue = -Infinity;
  let minValue = Infinity;
  let over = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i] as number;
    if (v > maxValue) maxValue = v;
    if (v < minValue) minValue = v;
    if (Math.abs(v) > 1) over++;
  }
  const report = { samples: 0, runs: 0, longest: 0 };
  if (x.length === 0) return { clippedSamples: 0, clippedRuns: 0, longestRun: 0, maxValue: 0, minValue: 0, overFullScaleSamples: 0 };
  // A record sitting at or below zero has no positive peak to clip (and vice versa).
  const q = quantisationStep(x, tolerance);
  if (maxValue > 0) countRuns(x, maxValue, 1, minRun, tolerance, q, report);
  if (minValue < 0) countRuns(x, minValue, -1, minRun, tolerance, q, report);
  return { clippedSamples: report.samples, clippedRuns: report.runs, longestRun: report.longest, maxValue, minValue, overFullScaleSamples: over };
}
