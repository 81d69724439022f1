import { precondition, requirePositive } from '../util/preconditions.js';

/** A run of (near-)silent samples inside a capture. */
export interface DropoutRun {
  startSample: number;
  lengthSamples: number;
}

/**
 * Runs of at least `minDurationMs` where |x| ≤ `threshold` (default: exact digital zero),
 * excluding runs that touch the start or end of the capture (lead-in latency and tails are
 * not dropouts).
 * @throws RangeError on a bad sample rate, duration or threshold
 */
export function detectDropouts(x: Float64Array, sampleRate: number, minDurationMs = 1, threshold = 0): DropoutRun[] {
  const fn = 'detectDropouts';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(minDurationMs > 0 && threshold >= 0, fn, 'minDurationMs must be > 0 and threshold ≥ 0');
  const minLength = Math.max(1, Math.round((minDurationMs * sampleRate) / 1000));
  const runs: DropoutRun[] = [];
  let start = -1;
  for (let i = 0; i <= x.length; i++) {
    const silent = i < x.length && Math.abs(x[i] as number) <= threshold;
    if (silent && start < 0) start = i;
    if (!silent && start >= 0) {
      if (start > 0 && i < x.length && i - start >= minLength) runs.push({ startSample: start, lengthSamples: i - start });
      start = -1;
    }
  }
  return runs;
}

/**
 * Sample indices where the second difference e[n] = x[n] − 2x[n−1] + x[n−2] exceeds `factor`
 * times its RMS over the capture (and an absolute floor): a step or a lost/duplicated block
 * makes |e| jump by the step size, while smooth audio keeps e small. Flags closer than 3
 * samples are merged (one step disturbs two consecutive differences).
 * @param factor default 8; white noise exceeds 8·RMS with probability ~1e-15 per sample
 * @param floor absolute minimum |e| (default 1e-4 of full scale) so that a near-silent capture
 *   does not flag its own quantisation steps
 * @throws RangeError on a non-positive factor
 * @see finite-difference detection of impulsive disturbances, S. V. Vaseghi, "Advanced Digital
 *   Signal Processing and Noise Reduction", 4th ed., Wiley 2008, ch. 12 (impulsive noise)
 */
export function detectDiscontinuities(x: Float64Array, factor = 8, floor = 1e-4): number[] {
  precondition(factor > 0 && floor >= 0, 'detectDiscontinuities', 'factor must be > 0 and floor ≥ 0');
  if (x.length < 3) return [];
  let sumSq = 0;
  for (let i = 2; i < x.length; i++) {
    const e = (x[i] as number) - 2 * (x[i - 1] as number) + (x[i - 2] as number);
    sumSq += e * e;
  }
  const limit = Math.max(factor * Math.sqrt(sumSq / (x.length - 2)), floor);
  const out: number[] = [];
  for (let i = 2; i < x.length; i++) {
    const e = (x[i] as number) - 2 * (x[i - 1] as number) + (x[i - 2] as number);
    if (Math.abs(e) > limit) {
      const last = out[out.length - 1];
      if (last === undefined || i - last >= 3) out.push(i);
    }
  }
  return out;
}
