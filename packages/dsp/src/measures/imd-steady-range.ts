import { precondition, requirePositive } from '../util/preconditions.js';

/** Options of `steadyToneRange`. */
export interface SteadyToneRangeOptions {
  /** Block length for the short-term level, s (default 0.05: three periods of 60 Hz). */
  blockSeconds?: number;
  /** A block is steady when its mean-square level is within this many dB of the plateau (default 0.5). */
  toleranceDb?: number;
}

/**
 * The steady part [start, end) of a tone-signal capture: the longest run of blocks whose
 * short-term level lies within ±toleranceDb of the plateau, less one block at each end that
 * borders unsteady signal (a run that reaches an end of the record keeps it). The plateau is
 * the median block level among blocks within 30 dB of the loudest, so a long lead-in of idle
 * noise (the path's latency) or silence after the signal does not pull it down. Fades (any
 * length) and the latency lead-in fall outside the run, because an amplitude ramp spreads a
 * tone into sidebands that a modulation-distortion measure would count. A record too short
 * for three blocks, or without such a run, is returned whole.
 * Common practice: distortion analysers measure in steady state (AES17-2020 §4); the block
 * length and tolerance are ours, stated above (a block of 3 periods of f1 carries at most
 * 1/(2π·3) ≈ 5 % ripple in mean square, 0.23 dB).
 * @throws RangeError on a bad rate or options
 * @see AES17-2020 §4 (steady-state measurement conditions)
 */
export function steadyToneRange(x: Float64Array, sampleRate: number, options: SteadyToneRangeOptions = {}): [number, number] {
  const fn = 'steadyToneRange';
  requirePositive(sampleRate, fn, 'sampleRate');
  const blockSeconds = options.blockSeconds ?? 0.05;
  const toleranceDb = options.toleranceDb ?? 0.5;
  requirePositive(blockSeconds, fn, 'blockSeconds');
  requirePositive(toleranceDb, fn, 'toleranceDb');
  const block = Math.max(1, Math.round(blockSeconds * sampleRate));
  const count = Math.floor(x.length / block);
  if (count < 3) return [0, x.length];
  const level = new Float64Array(count);
  let loudest = 0;
  for (let b = 0; b < count; b++) {
    let s = 0;
    for (let i = b * block; i < (b + 1) * block; i++) s += (x[i] as number) ** 2;
    level[b] = s / block;
    loudest = Math.max(loudest, s / block);
  }
  if (loudest === 0) return [0, x.length];
  const loud = Array.from(level).filter((v) => v >= loudest * 1e-3).sort((p, q) => p - q);
  const plateau = loud[Math.floor(loud.length / 2)] as number;
  const ratio = 10 ** (toleranceDb / 10);
  let bestStart = 0;
  let bestLength = 0;
  for (let b = 0; b < count; ) {
    const v = level[b] as number;
    if (v <= plateau * ratio && v >= plateau / ratio) {
      let e = b;
      while (e < count && (level[e] as number) <= plateau * ratio && (level[e] as number) >= plateau / ratio) e++;
      if (e - b > bestLength) {
        bestLength = e - b;
        bestStart = b;
      }
      b = e;
    } else b++;
  }
  if (bestLength < 3) return [0, x.length];
  // A steady block next to a fade or the lead-in may straddle its end: drop it when the run can
  // spare it. A run that reaches the record's edge keeps it (nothing unsteady lies beyond).
  const spare = bestLength >= 5 ? 1 : 0;
  const runEnd = bestStart + bestLength;
  const start = bestStart === 0 ? 0 : (bestStart + spare) * block;
  // The samples after the last whole block were never judged: they may hold a silent run-out, so
  // the range ends at the last whole steady block.
  const end = runEnd === count ? count * block : (runEnd - spare) * block;
  precondition(end > start, fn, 'no steady stretch of the tone was found');
  return [start, end];
}

/**
 * The range a tone measure analyses: the caller's [start, end) if given, else
 * `steadyToneRange`; checked to hold at least 256 samples inside the record.
 * @param fn name of the calling function, for the error message
 * @throws RangeError naming `fn` when the range is outside the record or too short
 * @see steadyToneRange
 */
export function resolveToneRange(fn: string, x: Float64Array, sampleRate: number, range?: readonly [number, number]): [number, number] {
  const r: [number, number] = range ? [range[0], range[1]] : steadyToneRange(x, sampleRate);
  precondition(
    Number.isInteger(r[0]) && Number.isInteger(r[1]) && r[0] >= 0 && r[1] <= x.length && r[1] - r[0] >= 256,
    fn,
    `range must hold at least 256 samples inside the record (got ${r[0]}…${r[1]} of ${x.length})`,
  );
  return r;
}
