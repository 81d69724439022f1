import { precondition, requirePositive } from '../util/preconditions.js';
import { EngineInputError } from '../util/engine-input-error.js';

/** An exponential sine sweep found in (or described for) a reference signal. */
export interface SweepParameters {
  /** Instantaneous frequency at the sweep's first sample, Hz. */
  f1: number;
  /** Instantaneous frequency one sample past its last, Hz (f1·e^{T·ln(f2/f1)/T}). */
  f2: number;
  /** Duration T of the sweep (fades included, silence excluded), seconds. */
  sweepSeconds: number;
  /** Index of the sweep's first sample in the reference. */
  startSample: number;
  /** Peak amplitude (full scale 1). */
  amplitude: number;
}

/** Options of `detectExponentialSweep`. */
export interface SweepDetectOptions {
  /** Largest RMS residual of ln f(t) about the fitted line, nepers (default 0.02, i.e. 2 %). */
  maxLogResidual?: number;
  /** Smallest f2/f1 accepted as a sweep (default 2, one octave). */
  minRatio?: number;
}

// Envelope blocks are 5 ms; a block is "active" at ≥ −20 dB of the loudest block's RMS, which
// keeps dithered idle noise, trailing silence and the quiet ends of fades out of the fit.
const BLOCK_SECONDS = 0.005;
const ACTIVE_RMS_RATIO = 0.1;
// A frequency estimate spans at least this many zero-crossing intervals and this many seconds,
// so the sub-sample error of one interpolated crossing is averaged down.
const MIN_INTERVALS = 8;
const MIN_SEGMENT_SECONDS = 0.002;
const MIN_SEGMENTS = 8;
// The sweep's ends are its first and last samples above −60 dB of its peak, or above 4× the
// peak of the background (the 10th-percentile block RMS) when that is higher.
const ONSET_RATIO = 1e-3;
const BACKGROUND_FACTOR = 4;
// ±5 % of the block's peak level: far above −40 dB content (a 30 kHz pilot), and for f < fs/4 a
// sampled half period always holds a sample above 70 % of the peak, so no crossing is missed.
const HYSTERESIS = 0.05;
const OUTLIER_LOGS = [1, 0.3, 0.1];

/** ln of a segment's mean frequency corrected to ln f(t_mid): the mean of e^{rt} over Δ is e^{r·t_mid}·sinh(rΔ/2)/(rΔ/2). */
function corrected(s: Segment, slope: number): number {
  const u = (slope * s.span) / 2;
  return s.logF - (u > 1e-9 ? Math.log(Math.sinh(u) / u) : 0);
}

/** Span-weighted least-squares line ln f = a + slope·t, with the curvature correction at `slope`. */
function fitLogFrequency(segments: readonly Segment[], slope: number): { a: number; slope: number } | null {
  let sw = 0, st = 0, sy = 0, stt = 0, sty = 0;
  for (const s of segments) {
    const y = corrected(s, slope);
    sw += s.span;
    st += s.span * s.t;
    sy += s.span * y;
    stt += s.span * s.t * s.t;
    sty += s.span * s.t * y;
  }
  const det = sw * stt - st * st;
  if (!(det > 0)) return null;
  const b = (sw * sty - st * sy) / det;
  return { a: (sy - b * st) / sw, slope: b };
}

interface Segment {
  t: number;
  span: number;
  logF: number;
}

/**
 * Recognises an exponential (logarithmic) sine sweep x(t) = A·sin(2π·f1·T/ln(f2/f1)·(e^{t·ln(f2/f1)/T} − 1))
 * from its samples alone. The instantaneous frequency is measured between zero crossings
 * (interpolated linearly; for f < fs/2 every crossing of the sampled sine is seen once) over short
 * segments of the loud part of the signal, and ln f is fitted by a straight line in t: an
 * exponential sweep is exactly the signal whose ln f is linear in time with a positive slope
 * ln(f2/f1)/T (Farina 2000, eq. 2). A sine (slope 0), a multitone or noise (ln f scattered about
 * the line), a linear sweep (ln f curved), a falling sweep and an impulse (too short) are
 * rejected. The sweep's first and last samples are where |x| first and last exceeds −60 dB of its
 * peak (or 4× a steady background such as a pilot tone); f1 and f2 are read off the fitted line there (a fade changes the level, not the frequency).
 * Segment means are corrected for the curvature of e^{rt}: the mean frequency over a span Δ is
 * f(t_mid)·sinh(rΔ/2)/(rΔ/2).
 * @returns the sweep's parameters, or null when the signal is not a rising exponential sweep
 * @throws RangeError on a non-positive sample rate or bad options
 * @see A. Farina, "Simultaneous measurement of impulse response and distortion with a swept-sine
 *   technique", AES 108th Convention, 2000, preprint 5093 (the sweep and its instantaneous
 *   frequency); B. Boashash, "Estimating and interpreting the instantaneous frequency of a
 *   signal", Proc. IEEE 80(4), 1992 (zero-crossing estimators)
 */
export function detectExponentialSweep(reference: Float64Array, sampleRate: number, options: SweepDetectOptions = {}): SweepParameters | null {
  const fn = 'detectExponentialSweep';
  requirePositive(sampleRate, fn, 'sampleRate');
  const maxLogResidual = options.maxLogResidual ?? 0.02;
  const minRatio = options.minRatio ?? 2;
  precondition(maxLogResidual > 0, fn, `maxLogResidual must be > 0 (got ${maxLogResidual})`);
  precondition(minRatio > 1, fn, `minRatio must be > 1 (got ${minRatio})`);
  const n = reference.length;
  const block = Math.max(16, Math.round(BLOCK_SECONDS * sampleRate));
  if (n < 4 * block) return null;

  let peak = 0;
  for (let i = 0; i < n; i++) {
    const v = Math.abs(reference[i] as number);
    if (!Number.isFinite(v)) throw new EngineInputError(fn, `sample ${i} of the reference is ${reference[i]}; only finite samples can be analysed`);
    if (v > peak) peak = v;
  }
  if (peak === 0) return null;

  const blocks = Math.floor(n / block);
  const rms = new Float64Array(blocks);
  let maxRms = 0;
  for (let b = 0; b < blocks; b++) {
    let s = 0;
    for (let i = b * block; i < (b + 1) * block; i++) s += (reference[i] as number) ** 2;
    rms[b] = Math.sqrt(s / block);
    if ((rms[b] as number) > maxRms) maxRms = rms[b] as number;
  }
  const all = crossingSegments(reference, sampleRate, rms, block, ACTIVE_RMS_RATIO * maxRms);
  // Above fs/4 a half period spans under two samples and crossings may be missed: fit below it.
  const below = all.filter((s) => Math.exp(s.logF) < sampleRate / 4);
  const segments = below.length >= MIN_SEGMENTS ? below : all;
  if (segments.length < MIN_SEGMENTS) return null;

  // Weighted (by span) least squares of ln f = a + b·t, the curvature correction refined each pass.
  // Segments far off the line (e.g. where a fade lets a pilot tone dominate) are dropped in passes
  // at 1, 0.3 and 0.1 neper, so one wild segment cannot tilt the first line; a sweep may lose at
  // most 10 % of its duration so.
  let kept = segments;
  let fit = fitLogFrequency(kept, 0);
  for (const limit of [Infinity, ...OUTLIER_LOGS]) {
    if (!fit) return null;
    const line = fit;
    if (limit < Infinity) kept = kept.filter((g) => Math.abs(corrected(g, line.slope) - (line.a + line.slope * g.t)) <= limit);
    if (kept.length < MIN_SEGMENTS) return null;
    fit = fitLogFrequency(kept, line.slope);
    if (fit) fit = fitLogFrequency(kept, fit.slope);
  }
  if (!fit) return null;
  const total = segments.reduce((s, g) => s + g.span, 0);
  if (kept.reduce((s, g) => s + g.span, 0) < 0.9 * total) return null;
  const { a, slope } = fit;
  if (!(slope > 0)) return null;

  let sw = 0;
  let sr = 0;
  let covered = 0;
  for (const g of all) covered += g.span;
  for (const g of kept) {
    const r = corrected(g, slope) - (a + slope * g.t);
    sw += g.span;
    sr += g.span * r * r;
  }
  if (Math.sqrt(sr / sw) > maxLogResidual) return null;

  // Steady background (dither, an ultrasonic pilot) in the quiet blocks lifts the threshold above itself.
  const sorted = Float64Array.from(rms).sort();
  const quiet = sorted[Math.floor(0.1 * (sorted.length - 1))] as number;
  const background = quiet < ACTIVE_RMS_RATIO * maxRms ? quiet : 0;
  const threshold = Math.max(ONSET_RATIO * peak, BACKGROUND_FACTOR * Math.SQRT2 * background);
  let first = 0;
  while (first < n && Math.abs(reference[first] as number) < threshold) first++;
  let last = n - 1;
  while (last > first && Math.abs(reference[last] as number) < threshold) last--;
  const startSample = first;
  const endSample = last + 1;
  const t0 = startSample / sampleRate;
  const t1 = endSample / sampleRate;
  // The fitted segments must cover most of the sweep: a short burst is not a sweep.
  if (covered < 0.5 * (t1 - t0)) return null;
  const f1 = Math.exp(a + slope * t0);
  const f2 = Math.min(Math.exp(a + slope * t1), sampleRate / 2);
  if (!(f2 / f1 >= minRatio) || !(f1 > 0)) return null;
  return { f1, f2, sweepSeconds: t1 - t0, startSample, amplitude: peak };
}

/**
 * Zero crossings of the active part, grouped into consecutive runs of at least MIN_INTERVALS
 * intervals and MIN_SEGMENT_SECONDS; each run gives ln of its mean frequency (intervals/2/span).
 * A crossing counts only once the signal has gone past ±h on the new side (h = 5 % of the block's
 * peak level): small high-frequency content riding on the sweep (an ultrasonic pilot, dither)
 * crosses zero near each of the sweep's crossings but never reaches ±h, so it adds none.
 */
function crossingSegments(x: Float64Array, sampleRate: number, blockRms: Float64Array, block: number, activeRms: number): Segment[] {
  const out: Segment[] = [];
  const minSpan = MIN_SEGMENT_SECONDS * sampleRate;
  const end = blockRms.length * block;
  let runStart = -1;
  let intervals = 0;
  let state = 0;
  let lastZero = -1;
  for (let i = 0; i + 1 < end; i++) {
    const rms = blockRms[Math.floor(i / block)] as number;
    if (rms < activeRms) {
      runStart = -1;
      state = 0;
      continue;
    }
    const a = x[i] as number;
    const b = x[i + 1] as number;
    if (a >= 0 !== b >= 0) lastZero = i + a / (a - b);
    const h = HYSTERESIS * Math.SQRT2 * rms;
    const side = b > h ? 1 : b < -h ? -1 : 0;
    if (side === 0 || side === state) continue;
    const first = state === 0;
    state = side;
    if (first || lastZero < 0) continue;
    const t = lastZero;
    if (runStart < 0) {
      runStart = t;
      intervals = 0;
    } else {
      intervals++;
      if (intervals >= MIN_INTERVALS && t - runStart >= minSpan) {
        const span = t - runStart;
        out.push({ t: (runStart + t) / 2 / sampleRate, span: span / sampleRate, logF: Math.log((intervals * sampleRate) / (2 * span)) });
        runStart = t;
        intervals = 0;
      }
    }
  }
  return out;
}
