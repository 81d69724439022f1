import { precondition } from '../util/preconditions.js';

/**
 * Levinson–Durbin recursion: the order-p forward predictor a[1…p] (x̂[n] = Σ a_k·x[n−k]) from the
 * autocorrelation r[0…p], written into `a` (length ≥ p + 1, a[0] unused). Returns the final
 * prediction-error power (0 for a silent input, whose predictor stays all zero).
 * @throws RangeError when r holds fewer than p + 1 lags or a is too short
 * @see N. Levinson, J. Math. Phys. 25, 1947; J. Durbin, Rev. Int. Stat. Inst. 28, 1960;
 *   S. V. Vaseghi, "Advanced Digital Signal Processing and Noise Reduction", 4th ed., Wiley 2008,
 *   ch. 8 (linear prediction models, the Levinson–Durbin algorithm)
 */
export function levinsonDurbin(r: Float64Array, order: number, a: Float64Array): number {
  precondition(Number.isInteger(order) && order >= 1 && r.length >= order + 1 && a.length >= order + 1, 'levinsonDurbin', `need r of ≥ ${order + 1} lags and a of ≥ ${order + 1} values`);
  a.fill(0);
  let error = r[0] as number;
  if (!(error > 0)) return 0;
  const previous = new Float64Array(order + 1);
  for (let i = 1; i <= order; i++) {
    let acc = r[i] as number;
    for (let j = 1; j < i; j++) acc -= (a[j] as number) * (r[i - j] as number);
    const k = acc / error;
    previous.set(a);
    a[i] = k;
    for (let j = 1; j < i; j++) a[j] = (previous[j] as number) - k * (previous[i - j] as number);
    error *= 1 - k * k;
    // A reflection coefficient at |k| → 1 means the block is perfectly predictable so far; stop there.
    if (!(error > 0)) break;
  }
  return Math.max(error, 0);
}

/** Options of `predictionResidual`. */
export interface PredictionResidualOptions {
  /** Predictor order p (default 24). */
  order?: number;
  /** Samples per block fitted with its own predictor (default 512). */
  blockLength?: number;
  /**
   * White-noise correction: r[0] is raised by this fraction before the recursion (default 1e-9,
   * a −90 dB noise floor), so a pure tone gives a well-conditioned, bounded predictor.
   */
  whiteNoiseCorrection?: number;
}

/**
 * Blockwise linear-prediction residual e[n] = x[n] − Σ a_k·x[n−k]: each block of `blockLength`
 * samples gets its own order-p predictor from the autocorrelation of the Hann-windowed block
 * (the autocorrelation method), so a sweep or a changing programme is followed. The first p
 * samples of the record, which lack a full history, get e = 0. O(N·p).
 * @throws RangeError on a bad order, block length or correction
 * @see S. V. Vaseghi, "Advanced Digital Signal Processing and Noise Reduction", 4th ed., ch. 8
 *   (autocorrelation method of linear prediction) and ch. 12 (impulsive noise: detection from the
 *   prediction error of an autoregressive model)
 */
export function predictionResidual(x: Float64Array, options: PredictionResidualOptions = {}): Float64Array {
  const fn = 'predictionResidual';
  const order = options.order ?? 24;
  const blockLength = options.blockLength ?? 512;
  const correction = options.whiteNoiseCorrection ?? 1e-9;
  precondition(Number.isInteger(order) && order >= 1, fn, `order must be a whole number ≥ 1 (got ${order})`);
  precondition(Number.isInteger(blockLength) && blockLength > 2 * order, fn, `blockLength must be a whole number > 2·order (got ${blockLength})`);
  precondition(correction >= 0 && Number.isFinite(correction), fn, `whiteNoiseCorrection must be finite and ≥ 0 (got ${correction})`);
  const e = new Float64Array(x.length);
  const a = new Float64Array(order + 1);
  const r = new Float64Array(order + 1);
  const windowed = new Float64Array(blockLength);
  const hann = new Float64Array(blockLength);
  for (let i = 0; i < blockLength; i++) hann[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * (i + 0.5)) / blockLength);
  for (let start = 0; start < x.length; start += blockLength) {
    const end = Math.min(x.length, start + blockLength);
    const len = end - start;
    // A short last block is fitted together with the one before it.
    const fitStart = len < blockLength && start >= blockLength ? end - blockLength : start;
    const fitLen = end - fitStart;
    const w = fitLen === blockLength ? hann : null;
    for (let i = 0; i < fitLen; i++) {
      const v = x[fitStart + i] as number;
      windowed[i] = w ? v * (w[i] as number) : v * (0.5 - 0.5 * Math.cos((2 * Math.PI * (i + 0.5)) / fitLen));
    }
    for (let lag = 0; lag <= order; lag++) {
      let acc = 0;
      for (let i = lag; i < fitLen; i++) acc += (windowed[i] as number) * (windowed[i - lag] as number);
      r[lag] = acc;
    }
    r[0] = (r[0] as number) * (1 + correction);
    if (fitLen > order) levinsonDurbin(r, order, a);
    else a.fill(0);
    for (let n = Math.max(start, order); n < end; n++) {
      let prediction = 0;
      for (let k = 1; k <= order; k++) prediction += (a[k] as number) * (x[n - k] as number);
      e[n] = (x[n] as number) - prediction;
    }
  }
  return e;
}
