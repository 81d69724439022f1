import type { CheckEvaluation, MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { checkChannels, combineOutcomes, type ChannelOutcome } from '../check-outcome.js';
import { MaskCheckError } from '../mask-check-error.js';
import type { CaptureContext } from '../../context/capture-context.js';
import { sampleLimit } from '../limit-curve.js';
import { DEFAULT_REFERENCE_HZ, envelopePoints, type SpectrumPoints } from '../spectral-curves.js';

/** A run of adjacent measured frequencies outside the limits. */
export interface FailingRegion {
  fromHz: number;
  toHz: number;
  /** Most negative margin inside the run, dB. */
  worstMarginDb: number;
  /** Where that margin occurs, Hz, and the measured value there (dB or dBFS). */
  worstHz: number;
  worstDb: number;
}

/** The measured curve against an envelope's limits, point by point. */
export interface EnvelopeComparison {
  points: SpectrumPoints;
  /** Limits at the measured frequencies; NaN where a limit does not apply (or is absent). */
  upper: Float64Array;
  lower: Float64Array;
  /** Distance to the nearer applicable limit, dB, positive inside; NaN where no limit applies. */
  margin: Float64Array;
  /** Index of the smallest margin. */
  worstIndex: number;
  referenceGainDb: number | null;
  failingRegions: FailingRegion[];
}

/**
 * Frequencies the limits span together: [lowest first breakpoint, highest last breakpoint].
 * @throws MaskCheckError when the check has neither limit
 */
export function envelopeSpan(check: MagnitudeEnvelopeCheck): [number, number] {
  const curves = [check.upper, check.lower].filter((c): c is NonNullable<typeof c> => c !== undefined && c.length >= 2);
  if (curves.length === 0) throw new MaskCheckError('the envelope has neither an upper nor a lower limit');
  return [Math.min(...curves.map((c) => c[0]?.hz ?? Infinity)), Math.max(...curves.map((c) => c[c.length - 1]?.hz ?? -Infinity))];
}

/**
 * Comparisons made, per capture context, check and channel: a verdict and the plot drawn from its
 * context (the worker's default plot) compare the same envelope once. Callers only read them.
 */
const comparisons = new WeakMap<CaptureContext, WeakMap<MagnitudeEnvelopeCheck, Map<number, EnvelopeComparison>>>();

/**
 * Compares one channel's measured curve with the envelope: at each measured frequency inside a
 * limit's span, margin = upper − measured and measured − lower; the nearer limit counts.
 * Computed once per context, check and channel (the answer is shared: do not modify it).
 * @throws MaskCheckError when no measured frequency has a limit that applies
 */
export function compareEnvelope(ctx: CaptureContext, channel: number, check: MagnitudeEnvelopeCheck): EnvelopeComparison {
  let byCheck = comparisons.get(ctx);
  if (!byCheck) comparisons.set(ctx, (byCheck = new WeakMap()));
  let byChannel = byCheck.get(check);
  if (!byChannel) byCheck.set(check, (byChannel = new Map()));
  const made = byChannel.get(channel);
  if (made) return made;
  const comparison = measureEnvelope(ctx, channel, check);
  byChannel.set(channel, comparison);
  return comparison;
}

function measureEnvelope(ctx: CaptureContext, channel: number, check: MagnitudeEnvelopeCheck): EnvelopeComparison {
  const { points, referenceGainDb } = envelopePoints(ctx, channel, check, envelopeSpan(check));
  const n = points.hz.length;
  const upper = check.upper ? sampleLimit(check.upper, points.hz) : new Float64Array(n).fill(Number.NaN);
  const lower = check.lower ? sampleLimit(check.lower, points.hz) : new Float64Array(n).fill(Number.NaN);
  const margin = new Float64Array(n).fill(Number.NaN);
  let worstIndex = -1;
  const failingRegions: FailingRegion[] = [];
  let open: FailingRegion | null = null;
  for (let i = 0; i < n; i++) {
    const mu = (upper[i] as number) - (points.db[i] as number);
    const ml = (points.db[i] as number) - (lower[i] as number);
    // NaN marks a limit that does not apply here (Math.min would propagate it).
    const value = Number.isNaN(mu) ? ml : Number.isNaN(ml) ? mu : Math.min(mu, ml);
    margin[i] = value;
    if (Number.isNaN(value)) continue;
    if (worstIndex < 0 || value < (margin[worstIndex] as number)) worstIndex = i;
    const hz = points.hz[i] as number;
    if (value < 0) {
      if (open) {
        open.toHz = hz;
        if (value < open.worstMarginDb) {
          open.worstMarginDb = value;
          open.worstHz = hz;
          open.worstDb = points.db[i] as number;
        }
      } else {
        open = { fromHz: hz, toHz: hz, worstMarginDb: value, worstHz: hz, worstDb: points.db[i] as number };
        failingRegions.push(open);
      }
    } else open = null;
  }
  if (worstIndex < 0) throw new MaskCheckError('no measured frequency falls where a limit applies (the upper and lower spans leave a gap over every measured frequency)');
  return { points, upper, lower, margin, worstIndex, referenceGainDb, failingRegions };
}

/** Most failing regions listed per check (the worst ones). */
const MAX_REGIONS = 20;

/**
 * Magnitude envelope: the measured curve (transfer |H| normalised at referenceHz, or the level
 * spectrum in dBFS, optionally 1/N-octave smoothed) against piecewise-linear upper and lower
 * limits over log frequency. measured/limit/margin are taken at the worst frequency.
 * @throws MaskCheckError (caught by evaluateMask) when the check cannot be evaluated
 * @see docs/masks.md, "magnitude-envelope"
 */
export function evaluateMagnitudeEnvelope(ctx: CaptureContext, check: MagnitudeEnvelopeCheck): CheckEvaluation {
  const outcomes: ChannelOutcome[] = checkChannels(ctx, check).map((channel) => {
    const c = compareEnvelope(ctx, channel, check);
    const i = c.worstIndex;
    const measured = c.points.db[i] as number;
    const mu = (c.upper[i] as number) - measured;
    const limit = Number.isNaN(mu) || (c.margin[i] as number) !== mu ? (c.lower[i] as number) : (c.upper[i] as number);
    const margin = c.margin[i] as number;
    const regions = [...c.failingRegions].sort((a, b) => a.worstMarginDb - b.worstMarginDb).slice(0, MAX_REGIONS).sort((a, b) => a.fromHz - b.fromHz);
    return {
      channel,
      pass: margin >= 0,
      measured,
      limit,
      margin,
      worstHz: c.points.hz[i] as number,
      details: {
        referenceGainDb: c.referenceGainDb,
        pointsEvaluated: c.margin.reduce((s, m) => s + (Number.isNaN(m) ? 0 : 1), 0),
        evaluatedHz: [c.points.hz[0], c.points.hz[c.points.hz.length - 1]],
        failingRegions: regions,
      },
    };
  });
  return combineOutcomes(check, check.measure === 'transfer' ? 'dB' : 'dBFS', outcomes, {
    measure: check.measure,
    ...(check.measure === 'transfer' ? { referenceHz: check.referenceHz === undefined ? DEFAULT_REFERENCE_HZ : check.referenceHz } : {}),
    smoothing: check.smoothing ?? null,
  });
}
