import type { AnalysisReport, BandLevel, ChannelAnalysis, TransferAnalysis } from '@earmark/contracts';
import { ENGINE_VERSION } from '../engine-version.js';
import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { estimatePeakFrequency, measureDistortion } from '../measures/distortion.js';
import { detectDiscontinuities, detectDropouts } from '../measures/integrity.js';
import { steadyStateRange } from '../measures/steady-state.js';
import { measureLevels, spectralEnergy } from '../measures/levels.js';
import { bandLevels, fractionalOctaveBands } from '../measures/octave-bands.js';
import { createWindow } from '../spectrum/windows.js';
import { estimateLatency } from '../transfer/fft-convolution.js';
import { summarizeTransfer } from '../transfer/phase-analysis.js';
import { estimateTransferFunction } from '../transfer/transfer-function.js';
import { nextPowerOfTwo, precondition, requirePositive } from '../util/preconditions.js';

/** Multichannel audio at full scale ±1 (DecodedAudio satisfies it). */
export interface AudioBuffers {
  sampleRate: number;
  channels: readonly Float64Array[];
}

/** Options of `analyzeCapture`. */
export interface AnalyzeCaptureOptions {
  /** The stimulus the capture answers; enables the `transfer` section. Mono references apply to every channel. */
  reference?: AudioBuffers;
  /** Transfer estimator (default `h1`; use `deconvolution` for sweeps). */
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

/** Reused per record length: the plan and window of the full-length FFTs. */
interface Workspace {
  plan: RealFftPlan;
  hann: Float64Array;
  hannPower: number;
  buffer: Float64Array;
  re: Float64Array;
  im: Float64Array;
}

function createWorkspace(length: number): Workspace {
  const plan = createRealFftPlan(Math.max(2, nextPowerOfTwo(length)));
  const hann = createWindow('hann', length, 'periodic');
  let hannPower = 0;
  for (const v of hann) hannPower += v * v;
  return { plan, hann, hannPower, buffer: new Float64Array(plan.size), re: new Float64Array(plan.bins), im: new Float64Array(plan.bins) };
}

function analyzeChannel(x: Float64Array, sampleRate: number, channel: number, ws: Workspace, options: AnalyzeCaptureOptions): ChannelAnalysis {
  const { plan, buffer, re, im } = ws;
  const levels = measureLevels(x);

  // Rectangular FFT of the zero-padded record: the frequency side of the Parseval check.
  buffer.fill(0);
  buffer.set(x);
  plan.forward(buffer, re, im);
  const frequencyEnergy = spectralEnergy(re, im, plan.size);

  // Hann FFT over the whole record: band levels (low leakage) and the fundamental's start value.
  // NOTE: only |X|² per bin is formed here; no log10/atan2 per bin (that work would dominate).
  for (let i = 0; i < x.length; i++) buffer[i] = (x[i] as number) * (ws.hann[i] as number);
  plan.forward(buffer, re, im);
  const last = plan.bins - 1;
  const power = new Float64Array(plan.bins);
  const magnitude = new Float64Array(plan.bins);
  const norm = 1 / (plan.size * ws.hannPower);
  for (let k = 0; k <= last; k++) {
    const p = (re[k] as number) ** 2 + (im[k] as number) ** 2;
    power[k] = (k === 0 || k === last ? 1 : 2) * p * norm;
    magnitude[k] = p; // monotone in |X|: enough for the peak search; refinePeak takes logs of 3 bins only
  }
  const binHz = sampleRate / plan.size;
  const nyquist = sampleRate / 2;
  const bands = fractionalOctaveBands(3, 24, nyquist).filter((b) => b.upperHz <= nyquist);
  const thirdOctaveBands: BandLevel[] = bandLevels(power, binHz, bands).map((l) => ({
    centerHz: l.band.nominalHz,
    exactCenterHz: l.band.centerHz,
    levelDbfs: finiteOrNull(l.levelDbfs),
  }));

  let initialFrequencyHz: number | undefined;
  if (levels.peak > 0 && x.length >= 64) {
    // magnitude holds |X|²; the parabola on its log is the same parabola (×2) as on log|X|.
    initialFrequencyHz = estimatePeakFrequency(magnitude, binHz, 10);
  }
  // The same steady part the mask's distortion checks measure (a latency lead-in is not distortion).
  const [start, end] = x.length >= 64 ? steadyStateRange(x, sampleRate) : [0, x.length];
  const whole = start === 0 && end === x.length;
  const distortion =
    x.length >= 64 && levels.peak > 0
      ? measureDistortion(whole ? x : x.subarray(start, end), sampleRate, whole ? { plan, initialFrequencyHz } : { initialFrequencyHz })
      : null;
  const tone = distortion?.tone ?? null;

  const result: ChannelAnalysis = {
    channel,
    rmsDbfs: finiteOrNull(levels.rmsDbfs),
    peakDbfs: finiteOrNull(levels.peakDbfs),
    crestFactorDb: finiteOrNull(levels.crestFactorDb),
    dcOffset: levels.dcOffset,
    clippedSamples: levels.clippedSamples,
    energy: {
      time: levels.energy,
      frequency: frequencyEnergy,
      relativeError: levels.energy > 0 ? Math.abs(frequencyEnergy - levels.energy) / levels.energy : Math.abs(frequencyEnergy),
    },
    fundamentalHz: tone ? tone.fundamentalHz : null,
    fundamentalDbfs: tone ? finiteOrNull(20 * Math.log10(tone.amplitude)) : null,
    thdPercent: tone ? tone.thdPercent : null,
    thdnDb: tone ? finiteOrNull(tone.thdnDb) : null,
    thdnPercent: tone ? tone.thdnPercent : null,
    snrDb: tone ? finiteOrNull(tone.snrDb) : null,
    sinadDb: tone ? finiteOrNull(tone.sinadDb) : null,
    enob: tone ? finiteOrNull(tone.enob) : null,
    noiseFloorDbfs: distortion ? finiteOrNull(distortion.noiseFloorDbfs) : null,
    noiseFloorDbfsA: distortion ? finiteOrNull(distortion.noiseFloorDbfsA) : null,
    thirdOctaveBands,
    dropouts: detectDropouts(x, sampleRate),
    discontinuities: detectDiscontinuities(x).slice(0, 1000),
  };
  const reference = options.reference;
  if (reference) {
    const refChannel = reference.channels[Math.min(channel, reference.channels.length - 1)];
    if (refChannel) result.transfer = analyzeTransfer(refChannel, x, sampleRate, options);
  }
  return result;
}

function analyzeTransfer(reference: Float64Array, capture: Float64Array, sampleRate: number, options: AnalyzeCaptureOptions): TransferAnalysis {
  const method = options.transferMethod ?? 'h1';
  const latency = estimateLatency(reference, capture);
  // Align the capture to the reference (zeros where the capture has no samples), so that the
  // estimate only sees the system's own residual phase and no window misalignment.
  const aligned = new Float64Array(reference.length);
  for (let i = 0; i < reference.length; i++) {
    const j = i + latency;
    aligned[i] = j >= 0 && j < capture.length ? (capture[j] as number) : 0;
  }
  const tf = estimateTransferFunction(reference, aligned, sampleRate, { method });
  const summary = summarizeTransfer(tf, { sampleRate, latencySamples: latency, ...(options.transferBandHz ? { bandHz: options.transferBandHz } : {}) });
  return {
    method,
    latencySamples: latency,
    latencyMs: (1000 * latency) / sampleRate,
    bandHz: summary.bandHz,
    groupDelayMs: {
      mean: summary.groupDelayMean === null ? null : 1000 * summary.groupDelayMean,
      maxDeviation: summary.groupDelayMaxDeviation === null ? null : 1000 * summary.groupDelayMaxDeviation,
    },
    linearPhaseDeviationDeg: summary.linearPhaseDeviationDeg,
    magnitudeDb: summary.magnitudeDb,
  };
}

/**
 * The engine's entry point: every measure of the analyze report for each channel of a capture
 * (levels, Parseval energy check, tone measures by sine fit, noise floor, 1/3-octave levels,
 * dropouts and discontinuities, and with a reference the transfer section). Three full-length
 * FFTs per channel (rectangular, Hann, residual), each from one shared plan.
 * @throws RangeError on a bad sample rate, no channels, unequal channel lengths, non-finite
 *   samples, an unknown channel index, or a reference at another sample rate
 * @see docs/analysis.md for every measure's method and source
 */
export function analyzeCapture(capture: AudioBuffers, options: AnalyzeCaptureOptions = {}): AnalysisReport {
  const fn = 'analyzeCapture';
  requirePositive(capture.sampleRate, fn, 'sampleRate');
  precondition(capture.channels.length >= 1, fn, 'capture has no channels');
  const frames = capture.channels[0]?.length ?? 0;
  precondition(frames >= 2, fn, `capture must hold at least 2 frames (got ${frames})`);
  capture.channels.forEach((c, i) => {
    precondition(c.length === frames, fn, `channel ${i} holds ${c.length} frames, channel 0 holds ${frames}`);
    for (let j = 0; j < c.length; j++) if (!Number.isFinite(c[j] as number)) throw new RangeError(`${fn}: channel ${i} sample ${j} is not finite`);
  });
  if (options.reference) {
    precondition(options.reference.sampleRate === capture.sampleRate, fn, `reference sample rate ${options.reference.sampleRate} Hz differs from the capture's ${capture.sampleRate} Hz`);
    precondition(options.reference.channels.length >= 1 && (options.reference.channels[0]?.length ?? 0) >= 16, fn, 'reference must hold at least 16 frames');
  }
  const selected = options.channels ?? capture.channels.map((_, i) => i);
  for (const c of selected) precondition(Number.isInteger(c) && c >= 0 && c < capture.channels.length, fn, `channel ${c} does not exist (capture has ${capture.channels.length})`);
  const ws = createWorkspace(frames);
  return {
    engineVersion: ENGINE_VERSION,
    sampleRate: capture.sampleRate,
    frames,
    channels: selected.map((c) => analyzeChannel(capture.channels[c] as Float64Array, capture.sampleRate, c, ws, options)),
  };
}
