import type { AnalysisReport, BandLevel, ChannelAnalysis, TransferAnalysis } from '@earmark/contracts';
import { CaptureContext, type ChannelTransfer } from '../context/capture-context.js';
import { MaskCheckError } from '../masks/mask-check-error.js';
import { ENGINE_VERSION } from '../engine-version.js';
import { GROUP_DELAY_GRID_FRACTION, groupDelayVariation } from '../masks/phase-fit.js';
import { validateMaskInput } from '../masks/mask-input.js';
import { bandLevels, fractionalOctaveBands } from '../measures/octave-bands.js';
import { thirdOctaveMagnitudes } from '../transfer/third-octave-magnitude.js';

/** Multichannel audio at full scale ±1 (DecodedAudio satisfies it). */
export interface AudioBuffers {
  sampleRate: number;
  channels: readonly Float64Array[];
}

/** Options of `analyzeCapture`. */
export interface AnalyzeCaptureOptions {
  /** The stimulus the capture answers; enables the `transfer` section. Mono references apply to every channel. */
  reference?: AudioBuffers;
  /** Transfer estimator (default: `deconvolution` when the reference is a sweep, else `h1`). */
  transferMethod?: 'h1' | 'deconvolution';
  /** Channels to analyse (default all), 0-based. */
  channels?: readonly number[];
  /** Band for group delay and phase linearity (default: |H| within 20 dB of its maximum). */
  transferBandHz?: readonly [number, number];
}

/** JSON has no −∞: levels of silence become null. */
function finiteOrNull(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

function thirdOctaveBands(ctx: CaptureContext, channel: number): BandLevel[] {
  const { power, binHz } = ctx.levelSpectrum(channel);
  const nyquist = ctx.sampleRate / 2;
  const bands = fractionalOctaveBands(3, 24, nyquist).filter((b) => b.upperHz <= nyquist);
  return bandLevels(power, binHz, bands).map((l) => ({ centerHz: l.band.nominalHz, exactCenterHz: l.band.centerHz, levelDbfs: finiteOrNull(l.levelDbfs) }));
}

function transferReport(ctx: CaptureContext, channel: number): TransferAnalysis {
  const timing = ctx.timing(channel);
  let t: ChannelTransfer;
  try {
    t = ctx.transfer(channel);
  } catch (error) {
    // No transfer estimate (an ambiguous latency, a capture that misses the stimulus): the
    // report keeps the timing it has and says why the rest is missing.
    if (!(error instanceof MaskCheckError)) throw error;
    ctx.noteTransferUnavailable(channel, error.message);
    return {
      method: ctx.transferMethod(channel),
      latencySamples: timing.latencySamples,
      latencyMs: (1000 * timing.latencySamples) / ctx.sampleRate,
      polarity: timing.polarity,
      coherenceMin: null,
      distortionVsFrequency: [],
      driftPpm: null,
      bandHz: null,
      groupDelayMs: { mean: null, maxDeviation: null },
      linearPhaseDeviationDeg: null,
      magnitudeDb: [],
    };
  }
  const band = ctx.input.transferBandHz;
  const fit = timing.ambiguous ? null : ctx.phaseFit(channel, band);
  const gd = fit ? groupDelayVariation(fit, GROUP_DELAY_GRID_FRACTION) : null;
  return {
    method: t.tf.method,
    latencySamples: timing.latencySamples,
    latencyMs: (1000 * timing.latencySamples) / ctx.sampleRate,
    polarity: timing.polarity,
    coherenceMin: ctx.coherenceMin(channel, band),
    distortionVsFrequency: ctx.distortionVsFrequency(channel),
    driftPpm: ctx.driftPpm(channel),
    bandHz: fit ? fit.bandHz : null,
    groupDelayMs: {
      mean: fit ? 1000 * fit.meanDelaySeconds : null,
      maxDeviation: gd ? 1000 * gd.seconds : null,
    },
    linearPhaseDeviationDeg: fit ? fit.maxDeviationDeg : null,
    magnitudeDb: thirdOctaveMagnitudes(t.tf, t.mag2),
  };
}

function channelReport(ctx: CaptureContext, channel: number): ChannelAnalysis {
  const x = ctx.signal(channel);
  const levels = ctx.levels(channel);
  const measurable = x.length >= 64;
  const d = measurable ? ctx.distortion(channel, undefined) : null;
  const tone = d?.tone ?? null;
  // A sweep has no steady part: its tone measures are skipped (see CaptureContext.distortion).
  const steady = d && Number.isFinite(d.noisePower) ? d.window : null;
  const report: ChannelAnalysis = {
    channel,
    steadySeconds: steady && steady.end > steady.start ? [steady.start / ctx.sampleRate, steady.end / ctx.sampleRate] : null,
    warnings: [],
    rmsDbfs: finiteOrNull(levels.rmsDbfs),
    peakDbfs: finiteOrNull(levels.peakDbfs),
    crestFactorDb: finiteOrNull(levels.crestFactorDb),
    dcOffset: levels.dcOffset,
    clippedSamples: ctx.clippedSamples(channel),
    energy: ctx.energy(channel),
    fundamentalHz: tone ? tone.fundamentalHz : null,
    fundamentalDbfs: tone ? finiteOrNull(tone.levelDbfs) : null,
    thdPercent: tone ? tone.thdPercent : null,
    thdnDb: tone ? finiteOrNull(tone.thdnDb) : null,
    thdnPercent: tone ? tone.thdnPercent : null,
    snrDb: tone ? finiteOrNull(tone.snrDb) : null,
    sinadDb: tone ? finiteOrNull(tone.sinadDb) : null,
    enob: tone ? finiteOrNull(tone.enob) : null,
    noiseFloorDbfs: d && d.noiseFloorDbfs !== null ? finiteOrNull(d.noiseFloorDbfs) : null,
    noiseFloorDbfsA: d && d.noiseFloorDbfsA !== null ? finiteOrNull(d.noiseFloorDbfsA) : null,
    thirdOctaveBands: thirdOctaveBands(ctx, channel),
    dropouts: ctx.dropouts(channel, 1),
    discontinuities: ctx.discontinuities(channel).slice(0, 1000),
  };
  if (ctx.hasReference) report.transfer = transferReport(ctx, channel);
  // Last: every measure above has had its say.
  report.warnings = ctx.warnings(channel);
  return report;
}

/**
 * The engine's entry point: every measure of the analyze report for each channel of a capture
 * (levels, Parseval energy check, tone measures over the steady window through the AES17
 * low-pass, 1/3-octave levels, clipping, dropouts and discontinuities, and with a reference
 * the transfer section: latency, polarity, coherence, phase, group delay, distortion versus
 * frequency, drift), each with plain-word warnings. It reads the same `CaptureContext` as
 * `evaluateMask`, so the report and a verdict cannot disagree.
 * @throws RangeError on a bad sample rate, no channels, unequal channel lengths, non-finite
 *   samples, an unknown channel index, or a reference at another sample rate
 * @see docs/analysis.md for every measure's method and source
 */
export function analyzeCapture(capture: AudioBuffers, options: AnalyzeCaptureOptions = {}): AnalysisReport {
  const input = { capture, ...options };
  const selected = validateMaskInput(input, 'analyzeCapture');
  const ctx = new CaptureContext(input, selected);
  return {
    engineVersion: ENGINE_VERSION,
    sampleRate: capture.sampleRate,
    frames: capture.channels[0]?.length ?? 0,
    channels: selected.map((c) => {
      const report = channelReport(ctx, c);
      ctx.release(c);
      return report;
    }),
  };
}
