import { precondition, requirePositive } from '../util/preconditions.js';

/** The steady part [start, end) of a record, in samples. */
export interface SteadyWindow {
  start: number;
  end: number;
  /** True when samples before `start` were left out (latency, idle noise, fade-in, settling). */
  trimmedLeadIn: boolean;
  /** True when samples from `end` on were left out (fade-out, early stop, settling). */
  trimmedTail: boolean;
  /** Plain words on how the window was found. */
  reason: string;
}

/** Options of `stimulusSteadyWindow`. */
export interface StimulusWindowOptions {
  /** Latency of the capture behind the stimulus, in samples (may be fractional; default 0). */
  latencySamples?: number;
  /** A stimulus sample counts as on the plateau within this many dB of the plateau's peak (default 0.001). */
  toleranceDb?: number;
  /** Extra settling time skipped at each trimmed side, ms (default 0). */
  settleMs?: number;
  /**
   * Fade lengths [in, out] in samples when the stimulus spec states them (fadeInSeconds·fs,
   * fadeOutSeconds·fs): used as they are instead of being found from the samples, which is
   * exact for every kind (noise has no fixed crest to find them by).
   */
  fadeSamples?: readonly [number, number];
}

/** Options of `captureSteadyWindow`. */
export interface CaptureWindowOptions {
  /** Upper band edge for the level decision, Hz (default 20 kHz); higher content is filtered out. */
  bandHighHz?: number;
  /** Level block length, ms (default 10). */
  blockMs?: number;
  /** Blocks averaged (centred) into the short-term level, odd (default 5: 50 ms, one period of 20 Hz). */
  smoothingBlocks?: number;
  /** Settling time skipped at each trimmed side, ms (default 10). */
  settleMs?: number;
  /** The level tolerance adapts to the plateau's spread, within [0.01 dB, this] (default 3 dB). */
  maxToleranceDb?: number;
  /** Shortest level counted as "sustained", ms (default 100). */
  minSustainMs?: number;
}

/** A first or last stimulus block this far (dB) below the plateau's RMS marks a fade. */
const FADE_RMS_DB = 0.1;

const whole = (n: number, reason: string): SteadyWindow => ({ start: 0, end: n, trimmedLeadIn: false, trimmedTail: false, reason });

/**
 * Steady window of a capture from the stimulus that was played. Onset and end are its first
 * and last non-zero samples. A fade shows as a first (last) block whose RMS lies more than
 * 0.1 dB below the median block RMS; then the first (last) sample whose magnitude reaches the
 * plateau peak less `toleranceDb` marks the end of the fade-in (start of the fade-out). For a sine, a sample that
 * reaches g·A ≥ 10^(−tol/20)·A proves the fade gain g has reached that level there, and a fade
 * is monotonic, so the window starts inside the plateau (up to half a period late). The plateau
 * peak is the median of block peaks over blocks of max(10 ms, two longest zero-crossing gaps),
 * so a block always holds a crest. Indices are shifted by the latency and rounded inward, then
 * clipped to the capture. For noise stimuli (no fixed crest) found fades are approximate: pass
 * `fadeSamples` from the spec, which is then exact.
 * @param stimulus the channel as played (fades included)
 * @param captureLength samples in the capture
 * @throws RangeError on a bad rate, length, latency or tolerance
 * @see AES17-2020 §4 (measure in steady state); the fade shape is the raised cosine of
 *   F. J. Harris, Proc. IEEE 66(1), 1978
 */
export function stimulusSteadyWindow(stimulus: Float64Array, captureLength: number, sampleRate: number, options: StimulusWindowOptions = {}): SteadyWindow {
  const fn = 'stimulusSteadyWindow';
  requirePositive(sampleRate, fn, 'sampleRate');
  precondition(Number.isInteger(captureLength) && captureLength >= 0, fn, `captureLength must be an integer ≥ 0 (got ${captureLength})`);
  const latency = options.latencySamples ?? 0;
  precondition(Number.isFinite(latency), fn, `latencySamples must be finite (got ${latency})`);
  const tolDb = options.toleranceDb ?? 0.001;
  precondition(Number.isFinite(tolDb) && tolDb > 0, fn, `toleranceDb must be a finite number > 0 (got ${tolDb})`);
  const settle = Math.round(((options.settleMs ?? 0) * sampleRate) / 1000);
  precondition(settle >= 0, fn, `settleMs must be ≥ 0 (got ${options.settleMs})`);

  let onset = 0;
  while (onset < stimulus.length && stimulus[onset] === 0) onset++;
  if (onset === stimulus.length) return whole(captureLength, 'The stimulus is silent; the whole capture is used.');
  let stop = stimulus.length;
  while (stop > onset && stimulus[stop - 1] === 0) stop--;
  const fades = options.fadeSamples;
  if (fades) {
    precondition(fades.every((v) => Number.isInteger(v) && v >= 0), fn, `fadeSamples must be integers ≥ 0 (got ${fades.join(', ')})`);
    // Generator fades start and end at the stimulus's own ends (fade.ts), not at its non-zero samples.
    const first = Math.max(onset, fades[0]);
    const last = Math.min(stop, stimulus.length - fades[1]) - 1;
    return placeWindow(first, last, stimulus.length, captureLength, latency, settle, `From the stated fades (${fades[0]}, ${fades[1]} samples), shifted by ${latency} samples of latency.`);
  }

  // The longest gap between sign changes bounds half the longest period present.
  let longestGap = 0;
  let lastChange = onset;
  let lastSign = Math.sign(stimulus[onset] as number);
  for (let i = onset + 1; i < stop; i++) {
    const s = Math.sign(stimulus[i] as number);
    if (s !== 0 && s !== lastSign) {
      longestGap = Math.max(longestGap, i - lastChange);
      lastChange = i;
      lastSign = s;
    }
  }
  const block = Math.max(Math.round(sampleRate / 100), 2 * longestGap, 1);
  const peaks: number[] = [];
  for (let b = onset; b + block <= stop; b += block) {
    let m = 0;
    for (let i = b; i < b + block; i++) m = Math.max(m, Math.abs(stimulus[i] as number));
    peaks.push(m);
  }
  if (peaks.length === 0) {
    for (let i = onset; i < stop; i++) peaks.push(Math.abs(stimulus[i] as number));
  }
  peaks.sort((a, b) => a - b);
  const plateau = peaks[Math.floor(peaks.length / 2)] as number;
  const threshold = plateau * 10 ** (-tolDb / 20);
  // A fade shows as a first (last) block whose RMS falls short of the plateau's median block RMS;
  // a plain waveform's own shape (a sine starting at phase 0) does not.
  const rms = (from: number, to: number): number => {
    let e = 0;
    for (let i = from; i < to; i++) e += (stimulus[i] as number) ** 2;
    return Math.sqrt(e / Math.max(1, to - from));
  };
  const blockRms: number[] = [];
  for (let b = onset; b + block <= stop; b += block) blockRms.push(rms(b, b + block));
  blockRms.sort((a, b) => a - b);
  const plateauRms = blockRms[Math.floor(blockRms.length / 2)] ?? rms(onset, stop);
  const fadeLimit = plateauRms * 10 ** (-FADE_RMS_DB / 20);
  let first = onset;
  if (rms(onset, Math.min(stop, onset + block)) < fadeLimit) while (first < stop && Math.abs(stimulus[first] as number) < threshold) first++;
  let last = stop - 1;
  if (rms(Math.max(first, stop - block), stop) < fadeLimit) while (last > first && Math.abs(stimulus[last] as number) < threshold) last--;
  const parts: string[] = [];
  if (onset > 0) parts.push(`onset at stimulus sample ${onset}`);
  if (first > onset) parts.push(`fade-in until sample ${first}`);
  if (last + 1 < stop) parts.push(`fade-out from sample ${last + 1}`);
  if (stop < stimulus.length) parts.push(`end at sample ${stop}`);
  const reason = `From the stimulus (plateau within ${tolDb} dB${parts.length > 0 ? '; ' + parts.join(', ') : ''}), shifted by ${latency} samples of latency.`;
  return placeWindow(first, last, stimulus.length, captureLength, latency, settle, reason);
}

/** Stimulus plateau [first, last] → capture window: settle at trimmed sides, latency, inward rounding, clipping. */
function placeWindow(first: number, last: number, stimulusLength: number, captureLength: number, latency: number, settle: number, reason: string): SteadyWindow {
  const s0 = first + (first > 0 ? settle : 0);
  const s1 = last + 1 - (last + 1 < stimulusLength ? settle : 0);
  const start = Math.min(captureLength, Math.max(0, Math.ceil(s0 + latency - 1e-9)));
  const end = Math.max(start, Math.min(captureLength, Math.floor(s1 + latency + 1e-9)));
  return { start, end, trimmedLeadIn: start > 0, trimmedTail: end < captureLength, reason };
}

/**
 * Second-order sections of an 8th-order Butterworth low-pass (bilinear transform, pre-warped):
 * Q_k = 1/(2·sin((2k − 1)π/16)), k = 1…4, each an RBJ low-pass section.
 * @see R. Bristow-Johnson, Audio EQ Cookbook, "LPF"; S. Butterworth, "On the theory of filter
 *   amplifiers", Wireless Engineer 7, 1930 (pole angles)
 */
function butterworthSections(cutoffHz: number, sampleRate: number): Float64Array[] {
  const w0 = (2 * Math.PI * cutoffHz) / sampleRate;
  const cos = Math.cos(w0);
  const sections: Float64Array[] = [];
  for (let k = 1; k <= 4; k++) {
    const q = 1 / (2 * Math.sin(((2 * k - 1) * Math.PI) / 16));
    const alpha = Math.sin(w0) / (2 * q);
    const a0 = 1 + alpha;
    const b0 = (1 - cos) / 2 / a0;
    sections.push(Float64Array.of(b0, 2 * b0, b0, (-2 * cos) / a0, (1 - alpha) / a0));
  }
  return sections;
}

/**
 * Mean square of each block of the DC-removed, band-limited record (one O(N) pass; the
 * low-pass runs only when the band edge sits below 0.9·fs/2, where ultrasonic content exists).
 */
function blockPowers(x: Float64Array, sampleRate: number, block: number, bandHigh: number): Float64Array {
  let mean = 0;
  for (let i = 0; i < x.length; i++) mean += x[i] as number;
  mean /= x.length;
  const count = Math.ceil(x.length / block);
  const power = new Float64Array(count);
  const filter = bandHigh < 0.9 * (sampleRate / 2) ? butterworthSections(bandHigh, sampleRate) : [];
  const state = new Float64Array(filter.length * 2);
  for (let b = 0; b < count; b++) {
    const from = b * block;
    const to = Math.min(x.length, from + block);
    let sum = 0;
    for (let i = from; i < to; i++) {
      let v = (x[i] as number) - mean;
      // Transposed direct form II, section by section.
      for (let s = 0; s < filter.length; s++) {
        const c = filter[s] as Float64Array;
        const y = (c[0] as number) * v + (state[2 * s] as number);
        state[2 * s] = (c[1] as number) * v - (c[3] as number) * y + (state[2 * s + 1] as number);
        state[2 * s + 1] = (c[2] as number) * v - (c[4] as number) * y;
        v = y;
      }
      sum += v * v;
    }
    power[b] = sum / (to - from);
  }
  return power;
}

/** Longest run of consecutive indices where `ok` holds, as [first, last]; null when none. */
function longestRun(count: number, ok: (j: number) => boolean): [number, number] | null {
  let best: [number, number] | null = null;
  let runStart = -1;
  for (let j = 0; j <= count; j++) {
    if (j < count && ok(j)) {
      if (runStart < 0) runStart = j;
    } else if (runStart >= 0) {
      if (!best || j - 1 - runStart > best[1] - best[0]) best = [runStart, j - 1];
      runStart = -1;
    }
  }
  return best;
}

/**
 * Steady window of a capture without its stimulus: the longest stretch whose short-term
 * in-band level stays on the plateau. Levels are mean squares of 10 ms blocks of the
 * DC-removed record after an 8th-order 20 kHz low-pass (so ultrasonic pilots and noise shaping
 * do not count), averaged over 5 blocks. A first pass keeps the longest run within 6 dB of the
 * loudest level sustained for 100 ms (idle noise and dither sit far below); the plateau is the
 * median level of that run and the tolerance 4 × 1.4826 × its median absolute deviation,
 * within [0.01 dB, 3 dB] (tight for tones, looser for noise); the second pass keeps the longest
 * run within that tolerance. A trimmed side then loses the settling time. A record that is all
 * steady (or silent) is returned whole.
 * @throws RangeError on a bad rate or options
 * @see AES17-2020 §4 (steady-state conditions); P. J. Rousseeuw, C. Croux, JASA 88, 1993
 *   (MAD as a robust spread, 1.4826 for a normal law). Thresholds are ours, stated above.
 */
export function captureSteadyWindow(x: Float64Array, sampleRate: number, options: CaptureWindowOptions = {}): SteadyWindow {
  const fn = 'captureSteadyWindow';
  requirePositive(sampleRate, fn, 'sampleRate');
  const bandHigh = Math.min(options.bandHighHz ?? 20000, sampleRate / 2);
  requirePositive(bandHigh, fn, 'bandHighHz');
  const block = Math.max(1, Math.round(((options.blockMs ?? 10) * sampleRate) / 1000));
  const smoothing = options.smoothingBlocks ?? 5;
  precondition(Number.isInteger(smoothing) && smoothing >= 1 && smoothing % 2 === 1, fn, `smoothingBlocks must be an odd integer ≥ 1 (got ${smoothing})`);
  const settle = Math.round(((options.settleMs ?? 10) * sampleRate) / 1000);
  precondition(settle >= 0, fn, `settleMs must be ≥ 0 (got ${options.settleMs})`);
  const maxTol = options.maxToleranceDb ?? 3;
  precondition(maxTol >= 0.01, fn, `maxToleranceDb must be ≥ 0.01 (got ${maxTol})`);
  const sustain = Math.max(1, Math.round((options.minSustainMs ?? 100) / (options.blockMs ?? 10)));
  const n = x.length;
  if (n < 2 * block) return whole(n, 'The record is shorter than two level blocks; the whole record is used.');

  const power = blockPowers(x, sampleRate, block, bandHigh);
  const count = power.length;
  // Centred moving mean square over the blocks, in dB; each block weighs by its sample count
  // (the last one may be short).
  const half = (smoothing - 1) / 2;
  const level = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    let s = 0;
    let m = 0;
    // At the ends the window shifts inward rather than shrinking, so it always spans the same time.
    const from = Math.max(0, Math.min(j - half, count - smoothing));
    for (let i = from; i < Math.min(count, from + smoothing); i++) {
      const size = Math.min(block, n - i * block);
      s += (power[i] as number) * size;
      m += size;
    }
    level[j] = 10 * Math.log10(s / m);
  }
  // Loudest level held for `sustain` blocks: max over j of min(level[j…j+sustain−1]).
  let loudest = -Infinity;
  const span = Math.min(sustain, count);
  for (let j = 0; j + span <= count; j++) {
    let m = Infinity;
    for (let i = j; i < j + span; i++) m = Math.min(m, level[i] as number);
    loudest = Math.max(loudest, m);
  }
  if (!Number.isFinite(loudest)) return whole(n, 'The record is silent; the whole record is used.');

  const coarse = longestRun(count, (j) => (level[j] as number) >= loudest - 6);
  if (!coarse) return whole(n, 'No sustained level was found; the whole record is used.');
  const run = Array.from(level.subarray(coarse[0], coarse[1] + 1)).sort((a, b) => a - b);
  const median = run[Math.floor(run.length / 2)] as number;
  const deviations = run.map((v) => Math.abs(v - median)).sort((a, b) => a - b);
  const mad = deviations[Math.floor(deviations.length / 2)] as number;
  const tolerance = Math.min(maxTol, Math.max(0.01, 4 * 1.4826 * mad));
  const fine = longestRun(count, (j) => Math.abs((level[j] as number) - median) <= tolerance) ?? coarse;
  // The smoothing spreads a short gap over several blocks (24 silent samples lower a 5-block
  // mean by 0.04 dB): at the run's ends, also require each block's own level to be on the plateau.
  // A short last block holds a fraction of a period, whose mean square is not the plateau's: it is not judged.
  const onPlateau = (j: number): boolean => (j + 1) * block > n || Math.abs(10 * Math.log10(power[j] as number) - median) <= Math.max(tolerance, 0.05);
  while (fine[0] < fine[1] && !onPlateau(fine[0])) fine[0]++;
  while (fine[1] > fine[0] && !onPlateau(fine[1])) fine[1]--;

  const leadIn = fine[0] > 0;
  const tail = fine[1] < count - 1;
  const start = leadIn ? fine[0] * block + settle : 0;
  const end = tail ? (fine[1] + 1) * block - settle : n;
  if (end - start < block) return whole(n, 'The steady part is shorter than one level block; the whole record is used.');
  return {
    start,
    end,
    trimmedLeadIn: leadIn,
    trimmedTail: tail,
    reason: `From the capture's in-band level: plateau ${(median + 10 * Math.log10(2)).toFixed(1)} dBFS ± ${tolerance.toFixed(2)} dB${leadIn ? `, lead-in of ${fine[0] * block} samples trimmed` : ''}${tail ? `, tail from sample ${(fine[1] + 1) * block} trimmed` : ''}.`,
  };
}
