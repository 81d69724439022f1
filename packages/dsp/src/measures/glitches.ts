import { precondition, requirePositive } from '../util/preconditions.js';
import { predictionResidual } from './glitch-prediction.js';

/** Options of `detectGlitches`. */
export interface GlitchOptions {
  /** Predictor order (default 24). */
  order?: number;
  /** Samples per predictor fit (default 512: short enough to follow a fast sweep near 20 kHz). */
  blockLength?: number;
  /** Length of the window the local residual level is taken over, in ms (default 4). */
  windowMs?: number;
  /** A sample is flagged when |residual| > factor × the local median |residual| (default 12). */
  factor?: number;
  /** Absolute floor of the threshold in full-scale units (default 2⁻²⁰ ≈ −120 dBFS, 8 LSB at 24 bits). */
  floor?: number;
  /**
   * Relative floor: the threshold is at least this fraction of the local peak |x| (default 1e-3,
   * −60 dB), so curvature changes far below the signal (the end of a fade) are not clicks.
   */
  relativeFloor?: number;
}

/** One discontinuity (click, step, lost or repeated block). */
export interface GlitchEvent {
  /** First flagged sample. */
  sample: number;
  /** Flagged samples from the first to the last of this event. */
  lengthSamples: number;
  /** Largest |residual| over its threshold (> 1). */
  strength: number;
}

/** Most values a window's median is taken over: longer windows are sampled evenly (the median of 256 of them is within a few % of the full one). */
const MEDIAN_SAMPLES = 256;

/** Median of values[from…to) using `scratch` (no allocation per call); evenly sampled beyond MEDIAN_SAMPLES values. */
function median(values: Float64Array, from: number, to: number, scratch: Float64Array): number {
  const count = to - from;
  if (count <= 0) return 0;
  const stride = Math.max(1, Math.floor(count / MEDIAN_SAMPLES));
  const n = Math.ceil(count / stride);
  const s = scratch.subarray(0, n);
  for (let i = 0; i < n; i++) s[i] = values[from + i * stride] as number;
  s.sort();
  return n % 2 === 1 ? (s[(n - 1) / 2] as number) : 0.5 * ((s[n / 2 - 1] as number) + (s[n / 2] as number));
}

/**
 * Discontinuities by a local method: the residual of a blockwise autoregressive predictor (order
 * ~24, Levinson–Durbin per block) is small and noise-like wherever the signal follows its recent
 * past — tones, sweeps, multitones, noise, quantised or not — and jumps at a click, a step or a
 * splice. A sample is flagged when |e| exceeds `factor` times the median |e| of its `windowMs`
 * window and both neighbouring windows (the largest of the three, so a signal onset next to
 * silence is judged against its louder side), the absolute `floor`, and `relativeFloor` × the
 * local peak. For Gaussian residual, median
 * |e| = 0.674σ, so factor 12 is 8.1σ: a false flag once per ~10¹⁵ samples.
 * Flags closer than one window are merged into one event (a click disturbs the residual for up to
 * `order` samples; a step until the next fit). O(N·order).
 * @throws RangeError on a bad sample rate or option
 * @see S. V. Vaseghi, "Advanced Digital Signal Processing and Noise Reduction", 4th ed., Wiley
 *   2008, ch. 12 (impulsive noise: detection by thresholding the inverse-filtered signal, with a
 *   threshold proportional to a robust local estimate of the excitation's deviation)
 */
export function detectGlitches(x: Float64Array, sampleRate: number, options: GlitchOptions = {}): GlitchEvent[] {
  const fn = 'detectGlitches';
  requirePositive(sampleRate, fn, 'sampleRate');
  const order = options.order ?? 24;
  const blockLength = options.blockLength ?? 512;
  const windowMs = options.windowMs ?? 4;
  const factor = options.factor ?? 12;
  const floor = options.floor ?? 2 ** -20;
  const relativeFloor = options.relativeFloor ?? 1e-3;
  precondition(relativeFloor >= 0 && Number.isFinite(relativeFloor), fn, `relativeFloor must be finite and ≥ 0 (got ${relativeFloor})`);
  requirePositive(windowMs, fn, 'windowMs');
  requirePositive(factor, fn, 'factor');
  precondition(floor >= 0 && Number.isFinite(floor), fn, `floor must be finite and ≥ 0 (got ${floor})`);
  if (x.length <= order + 1) return [];
  const residual = predictionResidual(x, { order, blockLength });
  const magnitude = residual;
  for (let i = 0; i < magnitude.length; i++) magnitude[i] = Math.abs(magnitude[i] as number);
  const window = Math.max(4 * order, Math.round((windowMs * sampleRate) / 1000));
  const tiles = Math.ceil((x.length - order) / window);
  const scratch = new Float64Array(window);
  const medians = new Float64Array(tiles);
  const peaks = new Float64Array(tiles);
  for (let t = 0; t < tiles; t++) {
    const from = order + t * window;
    const to = Math.min(x.length, from + window);
    medians[t] = median(magnitude, from, to, scratch);
    let p = 0;
    for (let n = from; n < to; n++) p = Math.max(p, Math.abs(x[n] as number));
    peaks[t] = p;
  }
  const events: GlitchEvent[] = [];
  let current: GlitchEvent | null = null;
  let lastFlag = -Infinity;
  for (let t = 0; t < tiles; t++) {
    const scale = Math.max(medians[t] as number, t > 0 ? (medians[t - 1] as number) : 0, t + 1 < tiles ? (medians[t + 1] as number) : 0);
    const peak = Math.max(peaks[t] as number, t > 0 ? (peaks[t - 1] as number) : 0, t + 1 < tiles ? (peaks[t + 1] as number) : 0);
    const threshold = Math.max(factor * scale, floor, relativeFloor * peak);
    const from = order + t * window;
    const to = Math.min(x.length, from + window);
    for (let n = from; n < to; n++) {
      const m = magnitude[n] as number;
      if (m <= threshold) continue;
      if (current && n - lastFlag <= window) {
        current.lengthSamples = n - current.sample + 1;
        current.strength = Math.max(current.strength, m / threshold);
      } else {
        current = { sample: n, lengthSamples: 1, strength: m / threshold };
        events.push(current);
      }
      lastFlag = n;
    }
  }
  return events;
}
