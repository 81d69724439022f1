import { MaskCheck, type BandLevelsCheck, type CapturePlot, type JudgingSettings, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { ENGINE_VERSION, MaskCheckError, captureCurves, stimulusAsPlayed, type CaptureContext, type DecodedAudio } from '@earmark/dsp';
import type { PlayedStimulus } from '../judging/stimulus-cache.js';

/** What one plot is drawn for: the columns asked for, the channel and check already resolved. */
export interface PlotShape {
  columns: number;
  channel: number;
  /** The spectral check whose limits are drawn (`plotCheck`); absent: the mask's first. */
  checkId?: string | null;
}

/** A capture's plot as stored: everything but the overlay, which belongs to another capture. */
export type CapturePlotCore = Omit<CapturePlot, 'overlay'>;

/** The channel a plot draws: the one asked for, else the settings' first mapped channel, within the capture. */
export function plotChannel(asked: number | undefined, settings: Pick<JudgingSettings, 'channelMap'>, channelCount: number): number {
  return Math.max(0, Math.min(asked ?? settings.channelMap[0] ?? 0, channelCount - 1));
}

/** The checks a spectrum can draw limits for. */
export type SpectralCheck = MagnitudeEnvelopeCheck | BandLevelsCheck;
export const isSpectralCheck = (c: MaskCheck): c is SpectralCheck => c.kind === 'magnitude-envelope' || c.kind === 'band-levels';

/**
 * The spectral check a plot draws: the one asked for, else the mask's first envelope, else its
 * first band-levels check; null when the mask has none. An id that names no spectral check of
 * the mask is the caller's mistake (the service answers 422 before it gets here).
 */
export function plotCheck(checks: readonly MaskCheck[], askedId: string | null | undefined): SpectralCheck | null {
  const spectral = checks.filter(isSpectralCheck);
  if (askedId) return spectral.find((c) => c.id === askedId) ?? null;
  return spectral.find((c) => c.kind === 'magnitude-envelope') ?? spectral[0] ?? null;
}

const farLimit = (measure: 'transfer' | 'level', nyquist: number, referenceHz?: number | null): MagnitudeEnvelopeCheck =>
  MaskCheck.parse({
    id: 'spectrum',
    kind: 'magnitude-envelope',
    measure,
    ...(measure === 'transfer' && referenceHz !== undefined ? { referenceHz } : {}),
    upper: [{ hz: 20, db: 400 }, { hz: Math.min(20000, nyquist * 0.98), db: 400 }],
  }) as MagnitudeEnvelopeCheck;

/** The frequency a transfer curve is normalised at (the engine's default is 1 kHz); null for a level or absolute |H|. */
const normalisedAt = (check: MagnitudeEnvelopeCheck): number | null => (check.measure === 'transfer' ? (check.referenceHz === undefined ? 1000 : check.referenceHz) : null);

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
  // The analysis thread passes the stimulus it already holds (its cache) rather than playing it again,
  // and the verdict's capture context, whose measures the curves reuse (captureCurves checks it fits).
  played?: PlayedStimulus,
  context?: CaptureContext,
): CapturePlotCore {
  const { stimulus: spec, analysis: settings } = judged;
  const reference = spec.kind !== 'silence' ? (played ?? stimulusAsPlayed(spec)) : undefined;
  const channel = Math.min(shape.channel, audio.channels.length - 1);
  const chosen = shape.checkId === undefined ? plotCheck(checks, null) : shape.checkId === null ? null : plotCheck(checks, shape.checkId);
  const envelope = chosen?.kind === 'magnitude-envelope' ? chosen : null;
  const bandCheck = chosen?.kind === 'band-levels' ? chosen : null;
  const nyquist = audio.sampleRate / 2;
  // Without an envelope, draw the plain spectrum over the audio band (a limit far out of view),
  // in the band check's own measure and normalisation so its steps sit on the curve.
  const fallbackMeasure = bandCheck ? bandCheck.measure : reference ? 'transfer' : 'level';
  const check = envelope ?? farLimit(fallbackMeasure, nyquist, bandCheck?.referenceHz);
  const transferMethod = settings.transferMethod ?? (spec.kind === 'sweep' ? 'deconvolution' : 'h1');
  const input = { capture: audio, ...(reference ? { reference } : {}), transferMethod } as const;
  // When no transfer function can be estimated (the capture misses part of the stimulus), the
  // verdict says why; the page still draws the capture's own level spectrum.
  let drawn: SpectralCheck | null = chosen;
  let curveCheck = check;
  let curves: ReturnType<typeof captureCurves>;
  try {
    curves = captureCurves(input, check, { columns: shape.columns, channel, ...(bandCheck ? { bands: bandCheck } : {}), ...(context ? { context } : {}) });
  } catch (error) {
    if (!(error instanceof MaskCheckError)) throw error;
    drawn = null;
    curveCheck = farLimit('level', nyquist);
    curves = captureCurves(input, curveCheck, { columns: shape.columns, channel, ...(context ? { context } : {}) });
  }
  const data = curves.spectrum;
  const bands = drawn?.kind === 'band-levels' ? curves.bandLevels : null;
  const failingRegions = bands
    ? bands.flatMap((b) => (b.margin !== null && b.margin < 0 ? [{ fromHz: b.lowerHz, toHz: b.upperHz, worstHz: b.nominalHz, worstMargin: b.margin }] : []))
    : data.failingRegions.map((r) => ({ fromHz: r.fromHz, toHz: r.toHz, worstHz: r.worstHz, worstMargin: r.worstMarginDb }));
  let worst: CapturePlot['worst'] = null;
  if (bands) {
    for (const b of bands) if (b.margin !== null && b.margin < 0 && b.measured !== null && (!worst || b.margin < worst.margin)) worst = { hz: Math.sqrt(b.lowerHz * b.upperHz), db: b.measured, margin: b.margin };
  } else {
    for (const r of data.failingRegions) if (!worst || r.worstMarginDb < worst.margin) worst = { hz: r.worstHz, db: r.worstDb, margin: r.worstMarginDb };
  }
  const hasEnvelope = drawn?.kind === 'magnitude-envelope';
  return {
    channel,
    checkId: drawn ? drawn.id : null,
    checkKind: drawn ? drawn.kind : null,
    measure: curveCheck.measure,
    normalisedAtHz: normalisedAt(curveCheck),
    unit: data.unit,
    spectrum: { hz: data.hz, min: data.measuredMin, max: data.measuredMax },
    upper: hasEnvelope ? data.upper : null,
    lower: hasEnvelope ? data.lower : null,
    bands,
    failingRegions,
    worst,
    phase: curves.phase,
    groupDelay: curves.groupDelay,
    waveform: curves.waveform,
    engineVersion: ENGINE_VERSION,
  };
}
