import type { MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { precondition } from '../util/preconditions.js';
import { compareEnvelope, type FailingRegion } from './checks/magnitude-envelope.check.js';
import { sampleLimit, type LimitBreakpoint } from './limit-curve.js';
import { CaptureContext } from '../context/capture-context.js';
import { validateMaskInput, type EvaluateMaskInput } from './mask-input.js';

/** Options of `maskPlotData`. */
export interface MaskPlotOptions {
  /** Number of log-spaced columns (default 512, at most 8192). */
  columns?: number;
  /** Channel to plot (default the first the check covers). */
  channel?: number;
}

/** What a dashboard draws for one magnitude envelope: the measured curve, the limits, the failures. */
export interface MaskPlotData {
  checkId: string;
  channel: number;
  /** Unit of the curve and limits: dB (transfer) or dBFS (level). */
  unit: 'dB' | 'dBFS';
  /** Geometric centre of each column, Hz (columns are equal steps of log frequency). */
  hz: number[];
  /** Column edges, Hz (columns + 1 values). */
  edgesHz: number[];
  /** Smallest and largest measured value in each column; null where no measured frequency falls. */
  measuredMin: (number | null)[];
  measuredMax: (number | null)[];
  /** Limits at the column centres; null where a limit does not apply. */
  upperAt: (number | null)[];
  lowerAt: (number | null)[];
  /** The limits' own breakpoints: straight segments on a log-frequency axis, so draw them as given. */
  upper: LimitBreakpoint[] | null;
  lower: LimitBreakpoint[] | null;
  /** Runs of measured frequencies outside the limits. */
  failingRegions: FailingRegion[];
  /** |H| at referenceHz that the transfer curve was divided by, dB (null for level or no normalisation). */
  referenceGainDb: number | null;
}

/**
 * Plot data of a magnitude-envelope check over one channel: the same measured curve and margins
 * `evaluateMask` uses, min/max-decimated into `columns` log-spaced columns (each column keeps
 * the extremes of the points inside it, so a narrow peak or notch survives decimation), the limit
 * curves, and the failing regions.
 * @throws RangeError on a bad capture, channel or column count; MaskCheckError when the check
 *   cannot be evaluated (e.g. a transfer measure without a stimulus)
 * @see docs/masks.md, "Plot data"
 */
export function maskPlotData(input: EvaluateMaskInput, check: MagnitudeEnvelopeCheck, options: MaskPlotOptions = {}): MaskPlotData {
  const analysed = validateMaskInput(input, 'maskPlotData');
  return maskPlotDataIn(new CaptureContext(input, analysed), check, options);
}

/**
 * `maskPlotData` over an existing capture context, so a page's spectrum, phase and verdict
 * share one transfer estimate.
 * @throws RangeError on a bad channel or column count; MaskCheckError when the check cannot be evaluated
 */
export function maskPlotDataIn(ctx: CaptureContext, check: MagnitudeEnvelopeCheck, options: MaskPlotOptions = {}): MaskPlotData {
  const fn = 'maskPlotData';
  const columns = options.columns ?? 512;
  precondition(Number.isInteger(columns) && columns >= 1 && columns <= 8192, fn, `columns must be a whole number 1…8192 (got ${columns})`);
  const channel = options.channel ?? check.channels?.[0] ?? ctx.defaultChannels[0] ?? 0;
  precondition(Number.isInteger(channel) && channel >= 0 && channel < ctx.input.capture.channels.length, fn, `channel ${channel} does not exist (capture has ${ctx.input.capture.channels.length})`);
  const c = compareEnvelope(ctx, channel, check);
  const n = c.points.hz.length;
  const lo = c.points.hz[0] as number;
  const hi = c.points.hz[n - 1] as number;
  const ratio = hi > lo ? Math.log(hi / lo) / columns : 0;
  const edgesHz = Array.from({ length: columns + 1 }, (_, i) => (i === columns ? hi : lo * Math.exp(i * ratio)));
  const hz = Array.from({ length: columns }, (_, i) => Math.sqrt((edgesHz[i] as number) * (edgesHz[i + 1] as number)));
  const measuredMin: (number | null)[] = new Array<number | null>(columns).fill(null);
  const measuredMax: (number | null)[] = new Array<number | null>(columns).fill(null);
  for (let i = 0; i < n; i++) {
    const f = c.points.hz[i] as number;
    const col = ratio > 0 ? Math.min(columns - 1, Math.floor(Math.log(f / lo) / ratio)) : 0;
    const v = c.points.db[i] as number;
    const mn = measuredMin[col];
    const mx = measuredMax[col];
    measuredMin[col] = mn === null || mn === undefined ? v : Math.min(mn, v);
    measuredMax[col] = mx === null || mx === undefined ? v : Math.max(mx, v);
  }
  const centres = Float64Array.from(hz);
  const at = (curve: readonly LimitBreakpoint[] | undefined): (number | null)[] =>
    curve ? Array.from(sampleLimit(curve, centres), (v) => (Number.isNaN(v) ? null : v)) : hz.map(() => null);
  return {
    checkId: check.id,
    channel,
    unit: check.measure === 'transfer' ? 'dB' : 'dBFS',
    hz,
    edgesHz,
    measuredMin,
    measuredMax,
    upperAt: at(check.upper),
    lowerAt: at(check.lower),
    upper: check.upper ? check.upper.map((p) => ({ hz: p.hz, db: p.db })) : null,
    lower: check.lower ? check.lower.map((p) => ({ hz: p.hz, db: p.db })) : null,
    failingRegions: c.failingRegions,
    referenceGainDb: c.referenceGainDb,
  };
}
