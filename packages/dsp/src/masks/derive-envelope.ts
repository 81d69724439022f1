import type { MagnitudeEnvelopeCheck, SpectralMeasure } from '@earmark/contracts';
import type { AudioBuffers } from '../analyze/analyze-capture.js';
import { precondition } from '../util/preconditions.js';
import { EngineInputError } from '../util/engine-input-error.js';
import { sampleLimit, type LimitBreakpoint } from './limit-curve.js';
import { CaptureContext } from '../context/capture-context.js';
import { validateMaskInput } from './mask-input.js';
import { roundedBoundingLimit } from './rounded-limit.js';
import { DEFAULT_REFERENCE_HZ, envelopePoints, type SpectrumPoints } from './spectral-curves.js';

/** What limits are derived from: golden captures of one test case and the stimulus they answer. */
export interface DeriveEnvelopeInput {
  captures: readonly AudioBuffers[];
  /** Needed for `measure: 'transfer'`. */
  reference?: AudioBuffers;
  transferMethod?: 'h1' | 'deconvolution';
}

/** Options of `deriveEnvelope`. */
export interface DeriveEnvelopeOptions {
  measure: SpectralMeasure;
  /** Transfer only: normalisation frequency (default 1000 Hz), null for the absolute gain. */
  referenceHz?: number | null;
  /** 1/N-octave smoothing, as the envelope check applies it (none when absent). */
  smoothing?: 1 | 3 | 6 | 12 | 24;
  /** Limits sit k standard deviations plus `guardDb` from the mean. */
  k: number;
  guardDb: number;
  /** Most straight segments per limit (so at most maxSegments + 1 breakpoints). */
  maxSegments: number;
  /** Span of the limits, Hz. */
  bandHz: readonly [number, number];
  /** Capture channel (default 0). */
  channel?: number;
  /** Id of the proposed check (default `derived-envelope`). */
  checkId?: string;
  /** Log-spaced columns of the plotted statistics (default 256). */
  columns?: number;
}

/** A proposal: the check, the statistics behind it and how far simplification moved the limits. */
export interface DerivedEnvelope {
  check: MagnitudeEnvelopeCheck;
  unit: 'dB' | 'dBFS';
  /** Frequencies measured in every golden capture, and the per-frequency statistics there. */
  hz: Float64Array;
  mean: Float64Array;
  /** Each golden capture's curve at `hz` (what the statistics and the yield estimate are taken from). */
  curves: Float64Array[];
  /** Sample standard deviation (N − 1 in the denominator). */
  std: Float64Array;
  upperRaw: Float64Array;
  lowerRaw: Float64Array;
  /** The statistics averaged into log-spaced columns, for plotting. */
  /** `curves`: each golden capture's curve in the same columns, in input order. */
  plot: { hz: number[]; mean: number[]; std: number[]; upperRaw: number[]; lowerRaw: number[]; curves: number[][] };
  /** Largest |simplified − raw| over the measured frequencies, dB. */
  maxDeviationDb: { upper: number; lower: number; overall: number };
  /** Largest amount the simplified upper falls below the raw upper (lower above raw lower), dB; 0 by construction. */
  maxStrayDb: number;
  /** Smallest margin of any golden capture against the proposed limits, dB. */
  worstGoldenMarginDb: number;
}

/**
 * Indices (ascending, first and last included) of at most `maxSegments + 1` points that keep
 * the polyline through (x, y) closest to all points, by top-down refinement: start from the
 * end points and repeatedly split the segment whose interior point lies farthest (vertically)
 * from it at that point — the Ramer–Douglas–Peucker split rule, driven by a segment budget
 * instead of a distance tolerance, and with the vertical distance because a limit is a
 * function of frequency (its error is in dB, not in a mix of dB and decades).
 * @throws RangeError when x and y differ in length, fewer than two points, or maxSegments < 1
 * @see U. Ramer, "An iterative procedure for the polygonal approximation of plane curves",
 *   Computer Graphics and Image Processing 1(3), 1972; D. H. Douglas, T. K. Peucker,
 *   "Algorithms for the reduction of the number of points required to represent a digitized
 *   line or its caricature", The Canadian Cartographer 10(2), 1973
 */
export function simplifyPolyline(x: Float64Array, y: Float64Array, maxSegments: number): number[] {
  const fn = 'simplifyPolyline';
  precondition(x.length === y.length, fn, `x and y must have the same length (${x.length} vs ${y.length})`);
  precondition(x.length >= 2, fn, `need at least two points (got ${x.length})`);
  precondition(Number.isInteger(maxSegments) && maxSegments >= 1, fn, `maxSegments must be a whole number ≥ 1 (got ${maxSegments})`);
  /** Farthest interior point of segment a…b and its distance (−1 when none). */
  const farthest = (a: number, b: number): [number, number] => {
    let at = -1;
    let dist = -1;
    const xa = x[a] as number;
    const ya = y[a] as number;
    const slope = ((y[b] as number) - ya) / ((x[b] as number) - xa);
    for (let i = a + 1; i < b; i++) {
      const d = Math.abs((y[i] as number) - (ya + slope * ((x[i] as number) - xa)));
      if (d > dist) {
        dist = d;
        at = i;
      }
    }
    return [at, dist];
  };
  const kept = [0, x.length - 1];
  // Open segments with their farthest point; the budget is small (≤ a few hundred), so a linear scan for the worst is enough.
  const open: { a: number; b: number; at: number; dist: number }[] = [];
  const push = (a: number, b: number) => {
    const [at, dist] = farthest(a, b);
    if (at >= 0 && dist > 0) open.push({ a, b, at, dist });
  };
  push(0, x.length - 1);
  while (kept.length - 1 < maxSegments && open.length > 0) {
    let w = 0;
    for (let i = 1; i < open.length; i++) if ((open[i] as (typeof open)[number]).dist > (open[w] as (typeof open)[number]).dist) w = i;
    const seg = open.splice(w, 1)[0] as (typeof open)[number];
    kept.push(seg.at);
    push(seg.a, seg.at);
    push(seg.at, seg.b);
  }
  return kept.sort((p, q) => p - q);
}

/** `values` on `grid` from a curve measured at other frequencies: linear in dB over log f; NaN outside it. */
function onGrid(points: SpectrumPoints, grid: Float64Array): Float64Array {
  const same = points.hz.length === grid.length && points.hz.every((f, i) => f === grid[i]);
  if (same) return points.db;
  const out = new Float64Array(grid.length).fill(Number.NaN);
  let j = 1;
  for (let i = 0; i < grid.length; i++) {
    const f = grid[i] as number;
    if (f < (points.hz[0] as number) || f > (points.hz[points.hz.length - 1] as number)) continue;
    while (j < points.hz.length - 1 && f > (points.hz[j] as number)) j++;
    const fa = points.hz[j - 1] as number;
    const fb = points.hz[j] as number;
    const t = fb > fa ? Math.log(f / fa) / Math.log(fb / fa) : 0;
    out[i] = (points.db[j - 1] as number) + t * ((points.db[j] as number) - (points.db[j - 1] as number));
  }
  return out;
}

/** Settings that turn golden curves into limits (a subset of DeriveEnvelopeOptions). */
export type EnvelopeLimitSettings = Pick<DeriveEnvelopeOptions, 'k' | 'guardDb' | 'maxSegments'>;

/** Limits derived from golden curves on one grid, with the statistics behind them. */
export interface EnvelopeLimits {
  mean: Float64Array;
  std: Float64Array;
  upperRaw: Float64Array;
  lowerRaw: Float64Array;
  upper: LimitBreakpoint[];
  lower: LimitBreakpoint[];
}

/**
 * The statistics and simplified limits of `deriveEnvelope` from curves already measured on one
 * grid `hz` (ascending, Hz): per frequency the mean and sample σ, raw limits m ± (k·σ + guardDb),
 * each simplified to `maxSegments` segments and rounded for review (roundedBoundingLimit: two
 * significant digits in Hz, 0.1 dB outward, still bounding its raw curve). Split out so the yield estimate can re-derive from N − 1 curves.
 * @throws RangeError on fewer than two curves or curves not of hz's length
 */
export function limitsFromCurves(hz: Float64Array, curves: readonly Float64Array[], settings: EnvelopeLimitSettings): EnvelopeLimits {
  const fn = 'limitsFromCurves';
  const n = curves.length;
  precondition(n >= 2, fn, `need at least two curves (got ${n})`);
  precondition(hz.length >= 2 && curves.every((c) => c.length === hz.length), fn, `every curve must have one value per frequency (${hz.length})`);
  const mean = new Float64Array(hz.length);
  const std = new Float64Array(hz.length);
  for (let j = 0; j < hz.length; j++) {
    let s = 0;
    for (const c of curves) s += c[j] as number;
    const m = s / n;
    let ss = 0;
    for (const c of curves) ss += ((c[j] as number) - m) ** 2;
    mean[j] = m;
    std[j] = Math.sqrt(ss / (n - 1));
  }
  const upperRaw = Float64Array.from(mean, (m, j) => m + settings.k * (std[j] as number) + settings.guardDb);
  const lowerRaw = Float64Array.from(mean, (m, j) => m - settings.k * (std[j] as number) - settings.guardDb);

  const logHz = Float64Array.from(hz, (f) => Math.log10(f));
  const simplify = (raw: Float64Array, side: 1 | -1): LimitBreakpoint[] => roundedBoundingLimit(hz, raw, simplifyPolyline(logHz, raw, settings.maxSegments), side);
  return { mean, std, upperRaw, lowerRaw, upper: simplify(upperRaw, 1), lower: simplify(lowerRaw, -1) };
}

/**
 * Proposes a magnitude envelope from golden captures: each capture's curve is measured exactly
 * as the envelope check measures it (transfer |H| normalised at referenceHz, or the level
 * spectrum; the same 1/N-octave smoothing), then per frequency the mean m and sample standard
 * deviation σ give raw limits m ± (k·σ + guardDb). Each raw limit is simplified to at most
 * `maxSegments` segments on (log10 f, dB) by Ramer–Douglas–Peucker refinement; breakpoint
 * frequencies are rounded to two significant digits, levels moved outward just enough that the
 * simplified upper limit is never below the raw upper (nor the lower above the raw lower) at any
 * measured frequency and rounded outward to 0.1 dB, and points on a straight run (within 0.1 dB)
 * are dropped, so a flat limit is one segment. The result is a valid `magnitude-envelope` check of contracts' MaskCheck schema.
 * Curves measured on different frequency grids (captures of different lengths) are
 * interpolated onto the first capture's grid; only frequencies every capture covers are used.
 * @throws RangeError (message starting "deriveEnvelope:") on fewer than two captures, captures at
 *   different sample rates, bad k/guard/segments/band, or a capture whose curve cannot be measured
 *   (e.g. a transfer measure without a stimulus, no stimulus energy in the band)
 * @see simplifyPolyline (Ramer 1972; Douglas & Peucker 1973); docs/masks.md, "Deriving limits, impact and drift"
 */
export function deriveEnvelope(input: DeriveEnvelopeInput, options: DeriveEnvelopeOptions): DerivedEnvelope {
  const fn = 'deriveEnvelope';
  const { captures } = input;
  precondition(captures.length >= 2, fn, `need at least two golden captures (got ${captures.length})`);
  precondition(Number.isFinite(options.k) && options.k >= 0, fn, `k must be ≥ 0 (got ${options.k})`);
  precondition(Number.isFinite(options.guardDb) && options.guardDb >= 0, fn, `guardDb must be ≥ 0 (got ${options.guardDb})`);
  precondition(Number.isInteger(options.maxSegments) && options.maxSegments >= 1 && options.maxSegments <= 511, fn, `maxSegments must be a whole number 1…511 (got ${options.maxSegments})`);
  const [lo, hi] = options.bandHz;
  precondition(lo > 0 && hi > lo, fn, `bandHz must satisfy 0 < low < high (got ${lo}…${hi})`);
  const channel = options.channel ?? 0;
  const columns = options.columns ?? 256;
  precondition(Number.isInteger(columns) && columns >= 1 && columns <= 4096, fn, `columns must be a whole number 1…4096 (got ${columns})`);
  const rate = captures[0]?.sampleRate;
  const measure = { measure: options.measure, referenceHz: options.measure === 'transfer' ? (options.referenceHz === undefined ? DEFAULT_REFERENCE_HZ : options.referenceHz) : undefined, smoothing: options.smoothing };

  const curves: SpectrumPoints[] = captures.map((capture, i) => {
    precondition(capture.sampleRate === rate, fn, `capture ${i} is at ${capture.sampleRate} Hz, capture 0 at ${rate} Hz`);
    const evalInput = { capture, ...(input.reference ? { reference: input.reference } : {}), ...(input.transferMethod ? { transferMethod: input.transferMethod } : {}) };
    validateMaskInput(evalInput, fn);
    precondition(channel < capture.channels.length, fn, `capture ${i} has no channel ${channel} (it has ${capture.channels.length})`);
    try {
      return envelopePoints(new CaptureContext(evalInput, [channel]), channel, measure, [lo, hi]).points;
    } catch (error) {
      throw new EngineInputError(fn, `capture ${i} could not be measured: ${(error as Error).message}`);
    }
  });

  // Statistics on the first capture's grid, where every capture has a value.
  const grid = (curves[0] as SpectrumPoints).hz;
  const values = curves.map((c) => onGrid(c, grid));
  const n = captures.length;
  const keep: number[] = [];
  for (let i = 0; i < grid.length; i++) if (values.every((v) => Number.isFinite(v[i] as number))) keep.push(i);
  precondition(keep.length >= 2, fn, `fewer than two frequencies in ${lo}…${hi} Hz are measured in every capture`);
  const hz = Float64Array.from(keep, (i) => grid[i] as number);
  const golden = values.map((v) => Float64Array.from(keep, (gi) => v[gi] as number));
  const { mean, std, upperRaw, lowerRaw, upper, lower } = limitsFromCurves(hz, golden, options);

  const upperAt = sampleLimit(upper, hz);
  const lowerAt = sampleLimit(lower, hz);
  let devUpper = 0;
  let devLower = 0;
  let stray = 0;
  for (let j = 0; j < hz.length; j++) {
    const du = (upperAt[j] as number) - (upperRaw[j] as number);
    const dl = (lowerRaw[j] as number) - (lowerAt[j] as number);
    devUpper = Math.max(devUpper, Math.abs(du));
    devLower = Math.max(devLower, Math.abs(dl));
    stray = Math.max(stray, -du, -dl);
  }
  let worstGolden = Infinity;
  for (const curve of golden) {
    curve.forEach((x, j) => {
      worstGolden = Math.min(worstGolden, (upperAt[j] as number) - x, x - (lowerAt[j] as number));
    });
  }

  const check: MagnitudeEnvelopeCheck = {
    kind: 'magnitude-envelope',
    id: options.checkId ?? 'derived-envelope',
    label: `Derived from ${n} golden captures: mean ± (${options.k}σ + ${options.guardDb} dB)`,
    measure: options.measure,
    ...(options.measure === 'transfer' ? { referenceHz: measure.referenceHz ?? null } : {}),
    ...(options.smoothing ? { smoothing: options.smoothing } : {}),
    ...(options.channel !== undefined ? { channels: [channel] } : {}),
    upper,
    lower,
  };
  return {
    check,
    unit: options.measure === 'transfer' ? 'dB' : 'dBFS',
    hz,
    curves: golden,
    mean,
    std,
    upperRaw,
    lowerRaw,
    plot: decimate(hz, { mean, std, upperRaw, lowerRaw }, golden, columns),
    maxDeviationDb: { upper: devUpper, lower: devLower, overall: Math.max(devUpper, devLower) },
    maxStrayDb: Math.max(0, stray),
    worstGoldenMarginDb: worstGolden,
  };
}

/** Column means over equal steps of log frequency; empty columns are left out. Each golden curve is averaged into the same columns. */
function decimate(hz: Float64Array, series: Record<'mean' | 'std' | 'upperRaw' | 'lowerRaw', Float64Array>, curves: readonly Float64Array[], columns: number): DerivedEnvelope['plot'] {
  const first = hz[0] as number;
  const last = hz[hz.length - 1] as number;
  const step = last > first ? Math.log(last / first) / columns : 1;
  // Index runs [from, to) of the non-empty columns.
  const runs: [number, number][] = [];
  let j = 0;
  for (let c = 0; c < columns && j < hz.length; c++) {
    const edge = c === columns - 1 ? Infinity : first * Math.exp((c + 1) * step);
    const from = j;
    while (j < hz.length && (hz[j] as number) < edge) j++;
    if (j > from) runs.push([from, j]);
  }
  const average = (values: Float64Array) =>
    runs.map(([from, to]) => {
      let s = 0;
      for (let i = from; i < to; i++) s += values[i] as number;
      return s / (to - from);
    });
  return {
    hz: runs.map(([from, to]) => {
      let s = 0;
      for (let i = from; i < to; i++) s += Math.log(hz[i] as number);
      return Math.exp(s / (to - from));
    }),
    mean: average(series.mean),
    std: average(series.std),
    upperRaw: average(series.upperRaw),
    lowerRaw: average(series.lowerRaw),
    curves: curves.map(average),
  };
}
