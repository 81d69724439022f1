import { precondition } from '../util/preconditions.js';
import { limitsFromCurves, type EnvelopeLimitSettings } from './derive-envelope.js';
import { sampleLimit, type LimitBreakpoint } from './limit-curve.js';
import { studentTUpperTail } from './student-t.js';

/** A counted rate with its 95 % Wilson score interval. */
export interface RateInterval {
  rate: number;
  low: number;
  high: number;
  /** Trials (golden curves left out in turn). */
  n: number;
  failures: number;
}

/** The Gaussian-model false-reject rate and the two bounds it lies between. */
export interface ParametricRate {
  /** Shown rate: bins within one 1/bandsPerOctave-octave band move together, bands independently. */
  rate: number;
  /** All bins fully correlated: the worst single bin's rate (a lower bound for any correlation). */
  correlatedBound: number;
  /** Every bin independent (the rate when deviations share nothing across frequency). */
  independentBound: number;
  /** Bands treated as independent in `rate`. */
  effectiveBands: number;
}

export interface YieldAtGuard {
  guardDb: number;
  /** Null with fewer than three golden curves (N − 1 = 1 curve has no spread). */
  leaveOneOut: RateInterval | null;
  parametric: ParametricRate;
}

export interface YieldEstimate extends YieldAtGuard {
  /** The same estimates with the guard band moved, the other settings kept. */
  byGuardBandDb: YieldAtGuard[];
}

export interface YieldEstimateOptions extends EnvelopeLimitSettings {
  /** Guard bands to tabulate, dB (default 0…3 dB in 0.1 dB steps). */
  guardBandsDb?: readonly number[];
  /** Width of the bands treated as independent in the parametric rate, 1/N octave (default 6, the default smoothing). */
  bandsPerOctave?: number;
}

/** z of a two-sided 95 % interval. */
const Z95 = 1.959963984540054;

/** 0…3 dB in 0.1 dB steps. */
export const DEFAULT_YIELD_GUARD_BANDS_DB: readonly number[] = Array.from({ length: 31 }, (_, i) => i / 10);

/**
 * Wilson score interval of a binomial proportion (95 % by default); unlike the normal
 * approximation it stays inside [0, 1] and is not empty at 0 or N failures, which matters
 * for the 5–50 trials of a leave-one-out over golden captures.
 * @see E. B. Wilson, "Probable inference, the law of succession, and statistical inference",
 *   Journal of the American Statistical Association 22 (1927) 209–212
 */
export function wilsonInterval(failures: number, n: number, z = Z95): { low: number; high: number } {
  precondition(Number.isInteger(n) && n >= 1 && Number.isInteger(failures) && failures >= 0 && failures <= n, 'wilsonInterval', `need whole numbers 0 ≤ failures ≤ n, n ≥ 1 (got ${failures} of ${n})`);
  const p = failures / n;
  const z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = (z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  return { low: Math.max(0, centre - half), high: Math.min(1, centre + half) };
}

/** Smallest margin of `curve` inside [lower, upper] (both sampled on the curve's grid); < 0 means it fails. */
function worstMargin(curve: Float64Array, upper: Float64Array, lower: Float64Array): number {
  let worst = Infinity;
  for (let j = 0; j < curve.length; j++) {
    const x = curve[j] as number;
    worst = Math.min(worst, (upper[j] as number) - x, x - (lower[j] as number));
  }
  return worst;
}

/**
 * The false-reject rate of an envelope derived from golden curves (`limitsFromCurves` with
 * `settings`), estimated two ways and tabulated over guard bands:
 *
 * - leave-one-out: each golden curve i is judged against limits derived from the other N − 1
 *   with the same settings; the rate is the fraction whose worst margin is below 0, with its
 *   Wilson interval. Distribution-free, but coarse (steps of 1/N).
 * - parametric: each frequency's value is taken as Gaussian, its mean and σ estimated by the
 *   golden mean m and sample σ from N curves; a further good unit then lies outside the limits
 *   there with p = T((U − m)/s) + T((m − L)/s), s = σ·√(1 + 1/N) and T the upper tail of
 *   Student's t with N − 1 degrees of freedom (the predictive distribution of one more draw,
 *   which carries the uncertainty of m and σ; with the plain normal, N = 20 and limits at 3σ
 *   the rate would come out several times too low). Frequencies are
 *   correlated (the check smooths over 1/N octave, and devices deviate in broad shapes), so a
 *   unit's overall rate lies between the fully-correlated bound max p and the independent bound
 *   1 − Π(1 − p). The shown rate assumes frequencies within one 1/bandsPerOctave-octave band move
 *   together and bands are independent: 1 − Π_bands(1 − max_band p).
 *
 * Moving the guard band by d moves both limits outward by d (the simplification is
 * shift-invariant), so other guard bands reuse the same derivations: exact up to the 0.1 dB
 * outward rounding of the breakpoints.
 * @throws RangeError on fewer than two curves, curves not on `hz`, negative guard bands or bad bandsPerOctave
 * @see wilsonInterval (Wilson 1927); docs/masks.md, "Yield estimate"
 */
export function estimateYield(hz: Float64Array, curves: readonly Float64Array[], options: YieldEstimateOptions): YieldEstimate {
  const fn = 'estimateYield';
  const guards = options.guardBandsDb ?? DEFAULT_YIELD_GUARD_BANDS_DB;
  precondition(guards.every((g) => Number.isFinite(g) && g >= 0), fn, 'guard bands must be finite and ≥ 0 dB');
  const bandsPerOctave = options.bandsPerOctave ?? 6;
  precondition(Number.isFinite(bandsPerOctave) && bandsPerOctave > 0, fn, `bandsPerOctave must be > 0 (got ${bandsPerOctave})`);
  const settings: EnvelopeLimitSettings = { k: options.k, guardDb: options.guardDb, maxSegments: options.maxSegments };
  const proposed = limitsFromCurves(hz, curves, settings);
  const sampled = (limit: readonly LimitBreakpoint[]) => sampleLimit(limit, hz);
  const upper = sampled(proposed.upper);
  const lower = sampled(proposed.lower);

  // Leave-one-out margins at the requested guard band; another guard g shifts each by g − guardDb.
  const looMargins: number[] | null =
    curves.length >= 3
      ? curves.map((curve, i) => {
          const rest = limitsFromCurves(
            hz,
            curves.filter((_, r) => r !== i),
            settings,
          );
          return worstMargin(curve, sampled(rest.upper), sampled(rest.lower));
        })
      : null;

  // Band of each frequency for the parametric rate: 1/bandsPerOctave octave from the lowest frequency.
  const first = hz[0] as number;
  const bandOf = Int32Array.from(hz, (f) => Math.floor(Math.log2(f / first) * bandsPerOctave + 1e-9));

  const dof = curves.length - 1;
  const predictiveScale = Math.sqrt(1 + 1 / curves.length);

  const at = (guardDb: number): YieldAtGuard => {
    const shift = guardDb - options.guardDb;
    let leaveOneOut: RateInterval | null = null;
    if (looMargins) {
      const failures = looMargins.filter((m) => m + shift < 0).length;
      leaveOneOut = { rate: failures / looMargins.length, ...wilsonInterval(failures, looMargins.length), n: looMargins.length, failures };
    }
    let worstBin = 0;
    let logPassAll = 0;
    let logPassBands = 0;
    let band = -1;
    let bandWorst = 0;
    let bands = 0;
    for (let j = 0; j < hz.length; j++) {
      const m = proposed.mean[j] as number;
      const s = (proposed.std[j] as number) * predictiveScale;
      const up = (upper[j] as number) + shift - m;
      const down = m - ((lower[j] as number) - shift);
      // σ = 0: a unit equals the mean, inside exactly when the mean is.
      const p = Math.min(1, s > 0 ? studentTUpperTail(up / s, dof) + studentTUpperTail(down / s, dof) : up < 0 || down < 0 ? 1 : 0);
      worstBin = Math.max(worstBin, p);
      // p = 1 gives log1p(−1) = −∞, and the rates come out as exactly 1.
      logPassAll += Math.log1p(-p);
      if (bandOf[j] !== band) {
        logPassBands += band >= 0 ? Math.log1p(-bandWorst) : 0;
        band = bandOf[j] as number;
        bandWorst = 0;
        bands++;
      }
      bandWorst = Math.max(bandWorst, p);
    }
    logPassBands += Math.log1p(-bandWorst);
    return {
      guardDb,
      leaveOneOut,
      // max(0, ·) turns the −0 of −expm1(0) into 0.
      parametric: { rate: Math.max(0, -Math.expm1(logPassBands)), correlatedBound: worstBin, independentBound: Math.max(0, -Math.expm1(logPassAll)), effectiveBands: bands },
    };
  };
  return { ...at(options.guardDb), byGuardBandDb: guards.map(at) };
}
