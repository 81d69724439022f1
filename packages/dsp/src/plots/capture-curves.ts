import type { BandLevelsCheck, MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { bandLevelSteps, type BandLevelStep } from './band-level-steps.js';
import { CaptureContext } from '../context/capture-context.js';
import { MaskCheckError } from '../masks/mask-check-error.js';
import { maskPlotDataIn, type MaskPlotData } from '../masks/mask-plot-data.js';
import { validateMaskInput, type EvaluateMaskInput } from '../masks/mask-input.js';
import { groupDelayFromPhase } from '../transfer/group-delay.js';
import { unwrapPhase } from '../spectrum/unwrap.js';
import { precondition } from '../util/preconditions.js';

/** A curve over log-spaced frequency columns. */
export interface PhaseCurve {
  hz: number[];
  deg: number[];
}
export interface GroupDelayCurve {
  hz: number[];
  ms: number[];
}
export interface WaveformColumns {
  seconds: number[];
  min: number[];
  max: number[];
}

/** Everything the capture page draws for one channel, from one capture context. */
export interface CaptureCurves {
  spectrum: MaskPlotData;
  /** Unwrapped phase with the bulk latency removed (readable shape), degrees; null without a stimulus. */
  phase: PhaseCurve | null;
  /** Group delay with the latency included, ms; null without a stimulus. */
  groupDelay: GroupDelayCurve | null;
  waveform: WaveformColumns;
  /** The plain-word warnings of the channel's measures (the same the verdict carries). */
  warnings: string[];
  /** The bands of the band-levels check asked for (`options.bands`), else null. */
  bandLevels: BandLevelStep[] | null;
}

/**
 * Phase and group delay of the channel's transfer estimate — the very estimate the verdict's
 * checks use — one point per log-spaced column (the first inside it: phase is smooth).
 * @see Oppenheim & Schafer §5.1 (τ = −dφ/dω)
 */
function phaseAndDelay(ctx: CaptureContext, channel: number, columns: number): { phase: PhaseCurve | null; groupDelay: GroupDelayCurve | null } {
  // Without a unique latency (a periodic stimulus) or a transfer estimate there is no phase to draw.
  if (ctx.timing(channel).ambiguous) return { phase: null, groupDelay: null };
  let transfer: ReturnType<CaptureContext['transfer']>;
  try {
    transfer = ctx.transfer(channel);
  } catch (error) {
    if (error instanceof MaskCheckError) return { phase: null, groupDelay: null };
    throw error;
  }
  const { tf, latencySamples } = transfer;
  const hz: number[] = [];
  const raw: number[] = [];
  for (let k = 1; k < tf.re.length; k++) {
    if (!tf.valid[k]) continue;
    hz.push(k * tf.binHz);
    raw.push(Math.atan2(tf.im[k] as number, tf.re[k] as number));
  }
  if (hz.length < 2) return { phase: null, groupDelay: null };
  const unwrapped = unwrapPhase(Float64Array.from(raw));
  const delay = groupDelayFromPhase(Float64Array.from(hz), unwrapped);
  const lo = Math.max(hz[0] as number, 10);
  const hi = hz[hz.length - 1] as number;
  const step = Math.log(hi / lo) / columns;
  const phase: PhaseCurve = { hz: [], deg: [] };
  const groupDelay: GroupDelayCurve = { hz: [], ms: [] };
  let next = lo;
  for (let i = 0; i < hz.length; i++) {
    const f = hz[i] as number;
    if (f < next) continue;
    phase.hz.push(f);
    phase.deg.push(((unwrapped[i] as number) * 180) / Math.PI);
    groupDelay.hz.push(f);
    groupDelay.ms.push(((delay[i] as number) + latencySamples / ctx.sampleRate) * 1000);
    next = f * Math.exp(step);
  }
  return { phase, groupDelay };
}

/** Min/max of the waveform per time column (a narrow spike survives decimation). */
export function waveformColumns(x: Float64Array, sampleRate: number, columns: number): WaveformColumns {
  const per = Math.max(1, Math.ceil(x.length / columns));
  const out: WaveformColumns = { seconds: [], min: [], max: [] };
  for (let start = 0; start < x.length; start += per) {
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = start; i < Math.min(x.length, start + per); i++) {
      const v = x[i] as number;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    out.seconds.push(start / sampleRate);
    out.min.push(lo);
    out.max.push(hi);
  }
  return out;
}

/**
 * Every measure a context memoises depends on the capture, the stimulus and the transfer method
 * only (its channel list is a default for checks, and the curves name their channel), so a
 * context made for an input that shares those three gives the same numbers.
 */
const sameMeasures = (a: EvaluateMaskInput, b: EvaluateMaskInput): boolean => a.capture === b.capture && a.reference === b.reference && a.transferMethod === b.transferMethod;

/**
 * The capture page's curves for one channel: the spectrum over the check's mask (as
 * `maskPlotData`), the phase and group delay of the transfer estimate, the waveform and the
 * channel's warnings — all from one `CaptureContext`, so what is drawn is what was judged.
 * `options.context` (the verdict's, from `maskContext`) is reused when it was made for the same
 * capture, stimulus and transfer method, and ignored otherwise.
 * @throws RangeError on a bad capture, channel or column count; MaskCheckError when the check
 *   cannot be evaluated (e.g. a transfer measure without a stimulus)
 */
export function captureCurves(input: EvaluateMaskInput, check: MagnitudeEnvelopeCheck, options: { columns: number; channel: number; bands?: BandLevelsCheck; context?: CaptureContext }): CaptureCurves {
  const analysed = validateMaskInput(input, 'captureCurves');
  precondition(Number.isInteger(options.columns) && options.columns >= 1 && options.columns <= 8192, 'captureCurves', `columns must be a whole number 1…8192 (got ${options.columns})`);
  const ctx = options.context && sameMeasures(options.context.input, input) ? options.context : new CaptureContext(input, analysed);
  const spectrum = maskPlotDataIn(ctx, check, options);
  const x = ctx.signal(options.channel);
  return {
    spectrum,
    ...(input.reference ? phaseAndDelay(ctx, options.channel, options.columns) : { phase: null, groupDelay: null }),
    waveform: waveformColumns(x, ctx.sampleRate, options.columns),
    warnings: ctx.warnings(options.channel),
    bandLevels: options.bands ? bandLevelSteps(ctx, options.bands, options.channel) : null,
  };
}
