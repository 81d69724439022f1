import { MaskCheck, type CapturePlot, type JudgingSettings, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { ENGINE_VERSION, MaskCheckError, captureCurves, stimulusAsPlayed, type DecodedAudio } from '@earmark/dsp';
import type { PlayedStimulus } from '../judging/stimulus-cache.js';

/** What one plot is drawn for: the columns asked for and the channel already resolved. */
export interface PlotShape {
  columns: number;
  channel: number;
}

/** A capture's plot as stored: everything but the overlay, which belongs to another capture. */
export type CapturePlotCore = Omit<CapturePlot, 'overlay'>;

/** The channel a plot draws: the one asked for, else the settings' first mapped channel, within the capture. */
export function plotChannel(asked: number | undefined, settings: Pick<JudgingSettings, 'channelMap'>, channelCount: number): number {
  return Math.max(0, Math.min(asked ?? settings.channelMap[0] ?? 0, channelCount - 1));
}

const farLimit = (measure: 'transfer' | 'level', nyquist: number): MagnitudeEnvelopeCheck =>
  MaskCheck.parse({ id: 'spectrum', kind: 'magnitude-envelope', measure, upper: [{ hz: 20, db: 400 }, { hz: Math.min(20000, nyquist * 0.98), db: 400 }] }) as MagnitudeEnvelopeCheck;

/**
 * The capture page's curves from decoded audio, the settings it was judged with and its mask's
 * checks — a pure function, so it runs in a compute thread and its answer can be stored.
 * One capture context: the spectrum, phase and group delay drawn are what the verdict used.
 * @throws EngineInputError / RangeError when the engine cannot draw this audio at all
 */
export function renderCapturePlot(
  audio: DecodedAudio,
  judged: JudgingSettings,
  checks: readonly MaskCheck[],
  shape: PlotShape,
  // The analysis thread passes the stimulus it already holds (its cache) rather than playing it again.
  played?: PlayedStimulus,
): CapturePlotCore {
  const { stimulus: spec, analysis: settings } = judged;
  const reference = spec.kind !== 'silence' ? (played ?? stimulusAsPlayed(spec)) : undefined;
  const channel = Math.min(shape.channel, audio.channels.length - 1);
  const envelope = checks.find((c): c is MagnitudeEnvelopeCheck => c.kind === 'magnitude-envelope') ?? null;
  const nyquist = audio.sampleRate / 2;
  // Without an envelope check, draw the plain spectrum over the audio band (a limit far out of view).
  const check = envelope ?? farLimit(reference ? 'transfer' : 'level', nyquist);
  const transferMethod = settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1');
  const input = { capture: audio, ...(reference ? { reference } : {}), transferMethod } as const;
  // When no transfer function can be estimated (the capture misses part of the stimulus), the
  // verdict says why; the page still draws the capture's own level spectrum.
  let drawn: MagnitudeEnvelopeCheck | null = envelope;
  let curves: ReturnType<typeof captureCurves>;
  try {
    curves = captureCurves(input, check, { columns: shape.columns, channel });
  } catch (error) {
    if (!(error instanceof MaskCheckError)) throw error;
    drawn = null;
    curves = captureCurves(input, farLimit('level', nyquist), { columns: shape.columns, channel });
  }
  const data = curves.spectrum;
  let worst: CapturePlot['worst'] = null;
  for (const r of data.failingRegions) if (!worst || r.worstMarginDb < worst.margin) worst = { hz: r.worstHz, db: r.worstDb, margin: r.worstMarginDb };
  return {
    channel,
    checkId: drawn ? drawn.id : null,
    unit: data.unit,
    spectrum: { hz: data.hz, min: data.measuredMin, max: data.measuredMax },
    upper: drawn ? data.upper : null,
    lower: drawn ? data.lower : null,
    failingRegions: data.failingRegions.map((r) => ({ fromHz: r.fromHz, toHz: r.toHz, worstHz: r.worstHz, worstMargin: r.worstMarginDb })),
    worst,
    phase: curves.phase,
    groupDelay: curves.groupDelay,
    waveform: curves.waveform,
    engineVersion: ENGINE_VERSION,
  };
}
