import { precondition, requirePositive } from '../util/preconditions.js';

export interface SteadyStateOptions {
  /** A sample counts as silent below this fraction of the record's peak (default 0.01, −40 dB). */
  silenceFraction?: number;
  /** A leading or trailing silent run longer than this marks a gap, ms (default 0.5). */
  minGapMs?: number;
  /** Settling time skipped after the signal starts and before it stops, ms (default 20). */
  settleMs?: number;
  /** Shortest steady part worth measuring, ms; shorter leaves the record whole (default 100). */
  minDurationMs?: number;
}

/**
 * The steady part [start, end) of a record that begins or ends with silence: a capture
 * carries the path's latency as leading silence, and a distortion measure over the whole
 * record would count the missing tone there as distortion. A side without a silent run is
 * kept as it is, so a continuous record is returned whole.
 * Common practice: distortion analysers measure after a settling time (AES17 §4 asks for
 * steady-state conditions). Thresholds are ours, stated above.
 * @throws RangeError for bad options (naming the function)
 */
export function steadyStateRange(x: Float64Array, sampleRate: number, options: SteadyStateOptions = {}): [number, number] {
  const fn = 'steadyStateRange';
  requirePositive(sampleRate, fn, 'sampleRate');
  const fraction = options.silenceFraction ?? 0.01;
  precondition(fraction > 0 && fraction < 1, fn, `silenceFraction must lie in (0, 1) (got ${fraction})`);
  const minGap = Math.round(((options.minGapMs ?? 0.5) * sampleRate) / 1000);
  const settle = Math.round(((options.settleMs ?? 20) * sampleRate) / 1000);
  const minLength = Math.round(((options.minDurationMs ?? 100) * sampleRate) / 1000);
  let peak = 0;
  for (const v of x) peak = Math.max(peak, Math.abs(v));
  if (peak === 0) return [0, x.length];
  const threshold = peak * fraction;
  let first = 0;
  while (first < x.length && Math.abs(x[first] as number) < threshold) first++;
  let last = x.length - 1;
  while (last > first && Math.abs(x[last] as number) < threshold) last--;
  const start = first > minGap ? first + settle : 0;
  const end = x.length - 1 - last > minGap ? last + 1 - settle : x.length;
  return end - start >= minLength ? [start, end] : [0, x.length];
}
