import { precondition, requirePositive } from '../util/preconditions.js';

/** Options of `detectDropoutGaps`. */
export interface DropoutGapOptions {
  /** Shortest gap reported, in ms (default 1). */
  minDurationMs?: number;
  /** How far below the surrounding level a gap must lie, in dB (default 40). */
  depthDb?: number;
  /** Length of the surrounding stretch on each side whose peak sets the level, in ms (default 20). */
  contextMs?: number;
  /**
   * A gap's edges must be abrupt: the 0.5 ms just before and just after it must peak within this
   * many dB of the surrounding level (default 27). A 20 Hz tone cut at a zero crossing still peaks
   * at 20·log10 sin(2π·20 Hz·0.5 ms) = −24 dB there; a 10 ms raised-cosine fade reaches −40 dB
   * from −30 dB in its last 0.5 ms (closed forms), so it reads as gradual.
   */
  edgeDb?: number;
}

/** A gap found inside a signal. */
export interface DropoutGap {
  startSample: number;
  lengthSamples: number;
  /** Peak inside the gap relative to the quieter side's surrounding peak, in dB (−Infinity for digital zero). */
  depthDb: number;
}

/** Largest value of peaks[from…to), clamped to the array; 0 when empty. */
function maxOf(peaks: Float64Array, from: number, to: number): number {
  let m = 0;
  for (let i = Math.max(0, from); i < Math.min(peaks.length, to); i++) m = Math.max(m, peaks[i] as number);
  return m;
}

/**
 * Dropouts as gaps far below the local level, not only digital zero: runs of frames whose peak
 * lies ≥ `depthDb` below the peak of the `contextMs` before and after them, with abrupt edges,
 * lasting ≥ `minDurationMs`. Runs touching the start or end of the record are lead-in latency or
 * a tail, not dropouts. A quiet signal is judged against itself (levels are relative), and a fade
 * is not a gap because its edge is not abrupt. Frames are min(0.5 ms, minDuration/2) long; the gap's
 * ends are then refined to the sample (|x| ≤ the gap threshold). O(N).
 * A deliberate abrupt silence between two loud passages (a stepped sequence without fades) reads
 * as a dropout: this function does not know the stimulus.
 * @throws RangeError on a bad sample rate or option
 * @see IEC 60268-3 (short-term level); envelope-based gap detection: common practice
 */
export function detectDropoutGaps(x: Float64Array, sampleRate: number, options: DropoutGapOptions = {}): DropoutGap[] {
  const fn = 'detectDropoutGaps';
  requirePositive(sampleRate, fn, 'sampleRate');
  const minDurationMs = options.minDurationMs ?? 1;
  const depthDb = options.depthDb ?? 40;
  const contextMs = options.contextMs ?? 20;
  const edgeDb = options.edgeDb ?? 27;
  requirePositive(minDurationMs, fn, 'minDurationMs');
  requirePositive(depthDb, fn, 'depthDb');
  requirePositive(contextMs, fn, 'contextMs');
  precondition(edgeDb >= 0 && Number.isFinite(edgeDb), fn, `edgeDb must be finite and ≥ 0 (got ${edgeDb})`);
  const minLength = Math.max(1, Math.round((minDurationMs * sampleRate) / 1000));
  const frame = Math.max(1, Math.min(Math.round(0.0005 * sampleRate), Math.floor(minLength / 2)));
  const frames = Math.ceil(x.length / frame);
  const peaks = new Float64Array(frames);
  for (let f = 0; f < frames; f++) {
    let p = 0;
    for (let i = f * frame; i < Math.min(x.length, (f + 1) * frame); i++) p = Math.max(p, Math.abs(x[i] as number));
    peaks[f] = p;
  }
  const context = Math.max(1, Math.round((contextMs * sampleRate) / 1000 / frame));
  const edgeFrames = Math.max(1, Math.round((0.0005 * sampleRate) / frame));
  const depth = 10 ** (-depthDb / 20);
  const edge = 10 ** (-edgeDb / 20);
  const gaps: DropoutGap[] = [];
  let f = 1;
  while (f < frames) {
    const before = maxOf(peaks, f - context, f);
    if (!(before > 0) || (peaks[f] as number) > before * depth) {
      f++;
      continue;
    }
    let end = f;
    while (end < frames && (peaks[end] as number) <= before * depth) end++;
    const runStart = f;
    f = end;
    if (end >= frames) break; // runs into the end of the record: a tail
    const after = maxOf(peaks, end, end + context);
    const level = Math.min(before, after);
    const threshold = level * depth;
    const inside = maxOf(peaks, runStart, end);
    if (inside > threshold) continue;
    // Abrupt edges: the signal is near its surrounding level right up to the gap on both sides.
    if (maxOf(peaks, runStart - edgeFrames, runStart) < before * edge || maxOf(peaks, end, end + edgeFrames) < after * edge) continue;
    let start = runStart * frame;
    while (start > 0 && Math.abs(x[start - 1] as number) <= threshold) start--;
    let stop = Math.min(x.length, end * frame);
    while (stop < x.length && Math.abs(x[stop] as number) <= threshold) stop++;
    if (start === 0 || stop >= x.length || stop - start < minLength) continue;
    let gapPeak = 0;
    for (let i = start; i < stop; i++) gapPeak = Math.max(gapPeak, Math.abs(x[i] as number));
    gaps.push({ startSample: start, lengthSamples: stop - start, depthDb: 20 * Math.log10(gapPeak / level) });
  }
  return gaps;
}
