import { createRealFftPlan } from '../fft/real-fft.js';
import { nextPowerOfTwo, precondition } from '../util/preconditions.js';

/**
 * Cross-spectrum weighting. `phat` (phase transform): every bin the reference carries is given
 * unit magnitude, so the correlation peak is as sharp as the stimulus bandwidth allows whatever
 * the response's colour; `none`: plain cross-correlation.
 */
export type CorrelationWeighting = 'phat' | 'none';

/** Options of `weightedCrossCorrelation`. */
export interface WeightedCorrelationOptions {
  /** Smallest lag searched (default −(reference length − 1)). */
  minLag?: number;
  /** Largest lag searched (default capture length − 1). */
  maxLag?: number;
  /** Default `phat`. */
  weighting?: CorrelationWeighting;
}

/** A correlation peak at sub-sample resolution with what is needed to judge it. */
export interface CorrelationPeak {
  /** Lag of the peak of |r| in samples (fractional): capture[n + lag] ≈ ±reference[n]. */
  lag: number;
  /** Whole-sample lag of the largest |r|. */
  integerLag: number;
  /** Sign of r at the peak. */
  polarity: 'normal' | 'inverted';
  /** 20·log10(|r| at the peak / largest |r| outside the peak's main lobe); Infinity when there is none. */
  peakRatioDb: number;
  /** Whole-sample lag of that second peak, or null. */
  secondLag: number | null;
  /**
   * Normalised plain correlation at the integer lag, Σ y[n+ℓ]·x[n] / √(Σx²·Σy²), in [−1, 1]:
   * how much of the capture the delayed stimulus explains (1 for a scaled copy).
   */
  coefficient: number;
  /** False when either input is silent (all zero): lag 0 is returned and means nothing. */
  valid: boolean;
}

/** Reference bins below this fraction of the strongest reference bin's power carry no stimulus (−60 dB). */
const REFERENCE_FLOOR = 1e-6;
/** Capture bins below this fraction of the strongest capture bin's power are treated as empty (−120 dB). */
const CAPTURE_FLOOR = 1e-12;
/** Bins between exact resynchronisations of the rotating phasor in `evaluateAt`. */
const RESYNC = 1024;

/**
 * r(τ), r′(τ), r″(τ) of the band-limited (trigonometric) interpolation of the circular
 * correlation whose spectrum is (wr, wi): r(τ) = (2/N)·Σ_k Re(W_k·e^{iω_kτ}), ω_k = 2πk/N,
 * DC and Nyquist excluded (PHAT gives them no meaningful phase).
 */
function evaluateAt(wr: Float64Array, wi: Float64Array, n: number, tau: number): [number, number, number] {
  const dw = (2 * Math.PI) / n;
  const stepC = Math.cos(dw * tau);
  const stepS = Math.sin(dw * tau);
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let c = 1;
  let s = 0;
  const last = wr.length - 1;
  for (let k = 1; k < last; k++) {
    if (k % RESYNC === 0) {
      c = Math.cos(dw * k * tau);
      s = Math.sin(dw * k * tau);
    } else {
      const t = c * stepC - s * stepS;
      s = c * stepS + s * stepC;
      c = t;
    }
    const re = (wr[k] as number) * c - (wi[k] as number) * s;
    const im = (wr[k] as number) * s + (wi[k] as number) * c;
    const w = dw * k;
    s0 += re;
    s1 -= w * im;
    s2 -= w * w * re;
  }
  const g = 2 / n;
  return [g * s0, g * s1, g * s2];
}

/**
 * Newton's method on r′(τ) = 0 from the integer peak (started at the parabolic vertex through
 * the three samples around it); the step is clamped so the result stays within one sample.
 */
function refineLag(wr: Float64Array, wi: Float64Array, n: number, lag: number, before: number, at: number, after: number): { lag: number; value: number } {
  const curvature = before - 2 * at + after;
  let tau = lag + (curvature !== 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (before - after)) / curvature)) : 0);
  let value = at;
  for (let iteration = 0; iteration < 6; iteration++) {
    const [r0, r1, r2] = evaluateAt(wr, wi, n, tau);
    value = r0;
    if (r2 === 0) break;
    const step = Math.max(-0.5, Math.min(0.5, -r1 / r2));
    tau = Math.max(lag - 1, Math.min(lag + 1, tau + step));
    // Newton converges quadratically; 1e-5 samples is far below any delay the engine reports.
    if (Math.abs(step) < 1e-5) break;
  }
  return { lag: tau, value };
}

/**
 * Generalised cross-correlation of `capture` against `reference` (r[ℓ] = Σ y[n+ℓ]·x[n], linear:
 * both are zero-padded so no lag wraps onto another inside the searched range), its largest |r|
 * refined to a fraction of a sample by band-limited interpolation, its sign, and the height of
 * the next peak outside the main lobe (a periodic or narrow-band stimulus gives several peaks of
 * nearly equal height, and then the lag is ambiguous).
 *
 * Main lobe: from the peak outwards until |r| has fallen below half the peak and stops falling.
 * Weighting `phat`: W_k = G_k/|G_k| where the reference has power within 60 dB of its strongest bin
 * (and the capture within 120 dB of its own), else 0, with G_k = Y_k·conj(X_k).
 * @throws RangeError on empty inputs or an empty lag range
 * @see C. H. Knapp, G. C. Carter, "The generalized correlation method for estimation of time
 *   delay", IEEE Trans. ASSP 24(4), 1976, pp. 320–327 (GCC and the PHAT weighting); band-limited
 *   interpolation of a sampled correlation: J. O. Smith III, "Spectral Audio Signal Processing",
 *   "Bandlimited interpolation" (trigonometric interpolation of a periodic sequence)
 */
export function weightedCrossCorrelation(reference: Float64Array, capture: Float64Array, options: WeightedCorrelationOptions = {}): CorrelationPeak {
  const fn = 'weightedCrossCorrelation';
  precondition(reference.length >= 1 && capture.length >= 1, fn, 'reference and capture must not be empty');
  const lx = reference.length;
  const ly = capture.length;
  const minLag = Math.max(options.minLag ?? -(lx - 1), -(lx - 1));
  const maxLag = Math.min(options.maxLag ?? ly - 1, ly - 1);
  precondition(Number.isInteger(minLag) && Number.isInteger(maxLag) && minLag <= maxLag, fn, `the lag range ${minLag}…${maxLag} is empty or not whole`);
  const weighting = options.weighting ?? 'phat';

  let ex = 0;
  for (let i = 0; i < lx; i++) ex += (reference[i] as number) ** 2;
  let ey = 0;
  for (let i = 0; i < ly; i++) ey += (capture[i] as number) ** 2;
  if (!(ex > 0 && ey > 0)) return { lag: 0, integerLag: 0, polarity: 'normal', peakRatioDb: 0, secondLag: null, coefficient: 0, valid: false };

  // No alias inside [minLag, maxLag]: ℓ + N lies past the capture and ℓ − N before the reference.
  const n = Math.max(4, nextPowerOfTwo(Math.max(ly - minLag, maxLag + lx)));
  const plan = createRealFftPlan(n);
  const buf = new Float64Array(n);
  buf.set(reference);
  const xr = new Float64Array(plan.bins);
  const xi = new Float64Array(plan.bins);
  plan.forward(buf, xr, xi);
  buf.fill(0);
  buf.set(capture);
  const wr = new Float64Array(plan.bins);
  const wi = new Float64Array(plan.bins);
  plan.forward(buf, wr, wi);

  let maxX = 0;
  let maxY = 0;
  for (let k = 0; k < plan.bins; k++) {
    maxX = Math.max(maxX, (xr[k] as number) ** 2 + (xi[k] as number) ** 2);
    maxY = Math.max(maxY, (wr[k] as number) ** 2 + (wi[k] as number) ** 2);
  }
  for (let k = 0; k < plan.bins; k++) {
    const ar = xr[k] as number;
    const ai = xi[k] as number;
    const br = wr[k] as number;
    const bi = wi[k] as number;
    // G = Y·conj(X)
    let gr = br * ar + bi * ai;
    let gi = bi * ar - br * ai;
    if (weighting === 'phat') {
      const px = ar * ar + ai * ai;
      const py = br * br + bi * bi;
      const mag = Math.sqrt(gr * gr + gi * gi);
      if (px >= REFERENCE_FLOOR * maxX && py >= CAPTURE_FLOOR * maxY && mag > 0) {
        gr /= mag;
        gi /= mag;
      } else {
        gr = 0;
        gi = 0;
      }
    }
    wr[k] = gr;
    wi[k] = gi;
  }
  wr[0] = 0;
  wi[0] = 0;
  wr[plan.bins - 1] = 0;
  wi[plan.bins - 1] = 0;
  plan.inverse(wr, wi, buf);

  const at = (lag: number): number => buf[((lag % n) + n) % n] as number;
  let bestLag = minLag;
  let best = -1;
  for (let lag = minLag; lag <= maxLag; lag++) {
    const v = Math.abs(at(lag));
    if (v > best) {
      best = v;
      bestLag = lag;
    }
  }

  // Main lobe: walk out while |r| is above half the peak or still falling.
  const half = 0.5 * best;
  let lo = bestLag;
  while (lo > minLag && (Math.abs(at(lo - 1)) > half || Math.abs(at(lo - 1)) < Math.abs(at(lo)))) lo--;
  let hi = bestLag;
  while (hi < maxLag && (Math.abs(at(hi + 1)) > half || Math.abs(at(hi + 1)) < Math.abs(at(hi)))) hi++;
  let second = 0;
  let secondLag: number | null = null;
  for (let lag = minLag; lag <= maxLag; lag++) {
    if (lag >= lo && lag <= hi) continue;
    const v = Math.abs(at(lag));
    if (v > second) {
      second = v;
      secondLag = lag;
    }
  }

  const refined = refineLag(wr, wi, n, bestLag, at(bestLag - 1), at(bestLag), at(bestLag + 1));
  // Fall back to the sampled peak if the interpolation wandered to a weaker point.
  const useRefined = Math.abs(refined.value) >= best * (1 - 1e-9);
  const lag = useRefined ? refined.lag : bestLag;
  const value = useRefined ? refined.value : at(bestLag);

  let dot = 0;
  const from = Math.max(0, -bestLag);
  const to = Math.min(lx, ly - bestLag);
  for (let i = from; i < to; i++) dot += (capture[i + bestLag] as number) * (reference[i] as number);

  return {
    lag,
    integerLag: bestLag,
    polarity: value < 0 ? 'inverted' : 'normal',
    peakRatioDb: second > 0 ? 20 * Math.log10(best / second) : Infinity,
    secondLag,
    coefficient: dot / Math.sqrt(ex * ey),
    valid: true,
  };
}
