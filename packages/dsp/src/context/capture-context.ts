import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import type { AudioBandPlan } from '../measures/audio-band.js';
import { measureCrosstalk, type CrosstalkResult } from '../measures/crosstalk.js';
import { measureImdSmpte, type ImdSmpteResult } from '../measures/imd-smpte.js';
import { measureImdTwinTone, type ImdTwinToneResult } from '../measures/imd-twin-tone.js';
import { measureToneDistortion, type ToneDistortionResult } from '../measures/tone-distortion.js';
import { detectClipping, type ClippingReport } from '../measures/clipping.js';
import { detectDropoutGaps } from '../measures/dropout-gaps.js';
import { detectGlitches } from '../measures/glitches.js';
import { measureLevels, spectralEnergy, type SignalLevels } from '../measures/levels.js';
import { createWindow } from '../spectrum/windows.js';
import { measureClockDrift } from '../timing/clock-drift.js';
import { checkStimulusCoverage, type StimulusCoverage } from '../timing/coverage.js';
import { interChannelDelay } from '../timing/inter-channel.js';
import { measureLatency } from '../timing/latency.js';
import { estimateTransferFunction, type TransferFunction } from '../transfer/transfer-function.js';
import { coherence, minimumCoherence, type CoherenceResult } from '../transfer/coherence.js';
import { analyzeSweepCapture, prepareSweepDeconvolution, type SweepAnalysis, type SweepDeconvolver } from '../transfer/sweep-analysis.js';
import { detectExponentialSweep, type SweepParameters } from '../transfer/sweep-detect.js';
import { sweepDistortionByBand } from '../transfer/sweep-distortion.js';
import { nextPowerOfTwo } from '../util/preconditions.js';
import { MaskCheckError } from '../masks/mask-check-error.js';
import type { EvaluateMaskInput } from '../masks/mask-input.js';
import { fitLinearPhase, type PhaseFit } from '../masks/phase-fit.js';

/** The capture's one-sided level spectrum (Hann window over the whole record, zero-padded). */
export interface LevelSpectrum {
  binHz: number;
  /** Mean-square power per bin, power-normalised by Σw², so a band's bins sum to its mean square. */
  power: Float64Array;
  /** Squared amplitude of a sinusoid centred on the bin (coherent-gain normalised, 2|X|/Σw). */
  amplitude2: Float64Array;
}

/** Transfer function of one channel against the stimulus, after removing the bulk delay. */
export interface ChannelTransfer {
  /** Whole-sample delay removed before estimating H (its fractional rest stays in H's phase). */
  latencySamples: number;
  tf: TransferFunction;
  /** |H|² per bin; 0 where the stimulus has no energy (tf.valid = 0). */
  mag2: Float64Array;
}

/** Latency and polarity of one channel against the stimulus. */
export interface ChannelTiming {
  /** Delay in samples with a fractional part. */
  latencySamples: number;
  polarity: 'normal' | 'inverted';
  /** A periodic stimulus leaves the delay undetermined: a latency check is then an error. */
  ambiguous: boolean;
  /**
   * Why the capture holds no stimulus to align (the correlation that decided it, or silence);
   * null when it was found. The latency is then meaningless and no other message claims one.
   */
  notFound: string | null;
  warnings: string[];
}

/** Delay of channel b after channel a. */
export interface ChannelDelay {
  delaySamples: number;
  polarity: 'normal' | 'inverted';
}

/** Tone and noise measures of one channel over one band and the steady window they used (see measures/tone-distortion.ts). */
export type ChannelDistortion = ToneDistortionResult;

/** γ² below this adds a warning: about 10 dB of output SNR in the worst bin (γ² = SNR/(1 + SNR)). */
const LOW_COHERENCE = 0.9;

/**
 * Largest share of the stimulus's active part a capture may miss before transfer measures are
 * an error: missing 1 % biases an H1 magnitude by at most 0.09 dB (10·log10(0.99)·−1).
 */
const MAX_MISSING_FRACTION = 0.01;

/** What a warning concerns, so a check shows only the warnings of the measures it used. */
export type WarningTopic = 'stimulus' | 'timing' | 'transfer' | 'steady' | 'tone' | 'integrity' | 'spectrum';

/** First sample above −40 dB of the record's peak (the start of its signal, idle noise aside). */
function onset(x: Float64Array): number {
  let peak = 0;
  for (const v of x) peak = Math.max(peak, Math.abs(v));
  const threshold = peak * 0.01;
  for (let i = 0; i < x.length; i++) if (Math.abs(x[i] as number) > threshold) return i;
  return 0;
}

function memo<K, V>(cache: Map<K, V>, key: K, make: () => V): V {
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const value = make();
  cache.set(key, value);
  return value;
}

/**
 * The one measurement pipeline: every intermediate of a capture's analysis, per channel,
 * computed on first use and kept (one level spectrum, one steady window, one latency, one
 * transfer estimate, one phase fit, one sine fit per band). `analyzeCapture`, `evaluateMask`
 * and the plot curves all read it, so a report, a verdict and a page cannot disagree, and a
 * mask costs what its checks need and no more. Every measure that is less reliable than
 * usual adds a plain-word warning to its channel (`warnings(channel)`).
 */
export class CaptureContext {
  readonly sampleRate: number;
  readonly frames: number;
  /** Channels a check without `channels` covers. */
  readonly defaultChannels: readonly number[];
  private readonly plans = new Map<number, RealFftPlan>();
  private readonly hannCache = new Map<number, Float64Array>();
  private readonly scratchCache = new Map<number, { buf: Float64Array; re: Float64Array; im: Float64Array }>();
  private readonly levelCache = new Map<string, SignalLevels>();
  private readonly parsevalCache = new Map<number, { time: number; frequency: number; relativeError: number }>();
  private readonly spectrumCache = new Map<number, LevelSpectrum>();
  private readonly transferCache = new Map<number, ChannelTransfer>();
  private readonly phaseCache = new Map<string, PhaseFit | null>();
  private readonly distortionCache = new Map<string, ChannelDistortion>();
  private readonly bandPlans = new Map<string, AudioBandPlan>();
  private readonly imdSmpteCache = new Map<number, ImdSmpteResult>();
  private readonly imdTwinCache = new Map<number, ImdTwinToneResult>();
  private readonly crosstalkCache = new Map<number, CrosstalkResult>();
  private readonly timingCache = new Map<number, ChannelTiming>();
  private readonly sweepCache = new Map<Float64Array, SweepParameters | null>();
  private readonly deconvolverCache = new Map<Float64Array, SweepDeconvolver>();
  private readonly sweepAnalysisCache = new Map<number, SweepAnalysis | null>();
  private readonly coherenceCache = new Map<number, CoherenceResult | null>();
  private readonly delayCache = new Map<string, ChannelDelay>();
  private readonly dropoutCache = new Map<string, { startSample: number; lengthSamples: number }[]>();
  private readonly glitchCache = new Map<number, number[]>();
  private readonly clipCache = new Map<number, ClippingReport>();
  private readonly coverageCache = new Map<number, StimulusCoverage & { missingFraction: number }>();
  private readonly driftCache = new Map<number, number | null>();
  private readonly warningLists = new Map<number, { topic: WarningTopic; text: string }[]>();

  constructor(
    readonly input: EvaluateMaskInput,
    defaultChannels: readonly number[],
  ) {
    this.sampleRate = input.capture.sampleRate;
    this.frames = input.capture.channels[0]?.length ?? 0;
    this.defaultChannels = defaultChannels;
  }

  /** Records warnings against a channel under the measure they concern. */
  private warn(channel: number, topic: WarningTopic, warnings: readonly string[]): void {
    const list = memo(this.warningLists, channel, () => []);
    for (const text of warnings) if (!list.some((w) => w.text === text)) list.push({ topic, text });
  }

  /** Every warning raised so far by the channel's measures (or those of the given topics), in the order raised. */
  warnings(channel: number, topics?: readonly WarningTopic[]): string[] {
    return (this.warningLists.get(channel) ?? []).filter((w) => !topics || topics.includes(w.topic)).map((w) => w.text);
  }

  /** True when a stimulus was given. */
  get hasReference(): boolean {
    return this.input.reference !== undefined;
  }

  /** A channel's samples; a channel the capture lacks is the check's error. */
  signal(channel: number): Float64Array {
    const x = this.input.capture.channels[channel];
    if (!x) throw new MaskCheckError(`channel ${channel} does not exist (the capture has ${this.input.capture.channels.length})`);
    return x;
  }

  /** The stimulus for a channel (a mono stimulus serves every channel; a capture with fewer channels than the stimulus is warned about). */
  reference(channel: number): Float64Array {
    const ref = this.input.reference;
    if (!ref) throw new MaskCheckError('this check compares the capture with its stimulus, and no stimulus (reference) was given');
    const capChannels = this.input.capture.channels.length;
    if (ref.channels.length > 1 && channel >= ref.channels.length) {
      this.warn(channel, 'stimulus', [`the stimulus has ${ref.channels.length} channels and the capture ${capChannels}: channel ${channel} was compared with stimulus channel ${ref.channels.length - 1}`]);
    } else if (ref.channels.length > 1 && capChannels < ref.channels.length) {
      this.warn(channel, 'stimulus', [`the stimulus has ${ref.channels.length} channels and the capture ${capChannels}: capture channel ${channel} was compared with stimulus channel ${channel}`]);
    }
    return ref.channels[Math.min(channel, ref.channels.length - 1)] as Float64Array;
  }

  /** Reusable FFT input and output buffers of one size, for transforms whose results are not kept. */
  private scratch(size: number): { buf: Float64Array; re: Float64Array; im: Float64Array } {
    return memo(this.scratchCache, size, () => ({ buf: new Float64Array(size), re: new Float64Array(size / 2 + 1), im: new Float64Array(size / 2 + 1) }));
  }

  plan(size: number): RealFftPlan {
    return memo(this.plans, size, () => createRealFftPlan(size));
  }

  /** RMS, peak, crest factor and DC over [from, to) samples. */
  levels(channel: number, from = 0, to = this.frames): SignalLevels {
    return memo(this.levelCache, `${channel}:${from}:${to}`, () => measureLevels(this.signal(channel).subarray(from, to)));
  }

  /** Energy in both domains: Σx² and (1/N)·Σ|X[k]|² of the zero-padded rectangular FFT (Parseval). */
  energy(channel: number): { time: number; frequency: number; relativeError: number } {
    return memo(this.parsevalCache, channel, () => {
      const x = this.signal(channel);
      const time = this.levels(channel).energy;
      // A sweep analysis already took the capture's zero-padded rectangular FFT: reuse its energy.
      const sweep = this.hasReference ? this.sweepAnalysisIfAny(channel) : null;
      if (sweep) return { time, frequency: sweep.captureEnergy, relativeError: time > 0 ? Math.abs(sweep.captureEnergy - time) / time : Math.abs(sweep.captureEnergy) };
      const plan = this.plan(Math.max(2, nextPowerOfTwo(x.length)));
      const { buf, re, im } = this.scratch(plan.size);
      buf.fill(0, x.length);
      buf.set(x);
      plan.forward(buf, re, im);
      const frequency = spectralEnergy(re, im, plan.size);
      return { time, frequency, relativeError: time > 0 ? Math.abs(frequency - time) / time : Math.abs(frequency) };
    });
  }

  /** |E_freq − E_time|/E_time of the zero-padded rectangular FFT (Parseval), 0 for silence. */
  parsevalError(channel: number): number {
    return this.energy(channel).relativeError;
  }

  levelSpectrum(channel: number): LevelSpectrum {
    return memo(this.spectrumCache, channel, () => {
      const x = this.signal(channel);
      const plan = this.plan(Math.max(2, nextPowerOfTwo(x.length)));
      const w = memo(this.hannCache, x.length, () => createWindow('hann', x.length, 'periodic'));
      let sumW = 0;
      let sumW2 = 0;
      const { buf, re, im } = this.scratch(plan.size);
      buf.fill(0, x.length);
      for (let i = 0; i < x.length; i++) {
        const wi = w[i] as number;
        sumW += wi;
        sumW2 += wi * wi;
        buf[i] = (x[i] as number) * wi;
      }
      plan.forward(buf, re, im);
      const last = plan.bins - 1;
      const power = new Float64Array(plan.bins);
      const amplitude2 = new Float64Array(plan.bins);
      const powerNorm = 1 / (plan.size * sumW2);
      for (let k = 0; k <= last; k++) {
        const p = (re[k] as number) ** 2 + (im[k] as number) ** 2;
        const side = k === 0 || k === last ? 1 : 2;
        power[k] = side * p * powerNorm;
        amplitude2[k] = (side * side * p) / (sumW * sumW);
      }
      // A Hann main lobe is 4 bins of fs/L wide; a 1/3-octave band 0.23·fc: below fc = 8.7/T
      // the band's level holds its neighbours' leakage.
      const lowestResolvedHz = (2 * this.sampleRate) / (0.23 * x.length);
      if (lowestResolvedHz > 25) {
        this.warn(channel, 'spectrum', [`the record (${(x.length / this.sampleRate).toFixed(3)} s) is too short to resolve 1/3-octave bands below ${Math.round(lowestResolvedHz)} Hz: their levels include leakage from neighbouring bands`]);
      }
      return { binHz: this.sampleRate / plan.size, power, amplitude2 };
    });
  }

  /** The exponential sweep the stimulus channel is, recognised from its samples (null: not a sweep). */
  sweepOf(reference: Float64Array): SweepParameters | null {
    return memo(this.sweepCache, reference, () => detectExponentialSweep(reference, this.sampleRate));
  }

  /** The sweep analysis when the stimulus is a sweep, else null; never throws for a bad reference. */
  private sweepAnalysisIfAny(channel: number): SweepAnalysis | null {
    try {
      return this.sweepAnalysis(channel);
    } catch {
      return null;
    }
  }

  /** The estimator of a channel's transfer function: the caller's, else deconvolution for a sweep, else H1. */
  transferMethod(channel: number): 'h1' | 'deconvolution' {
    return this.input.transferMethod ?? (this.sweepOf(this.reference(channel)) ? 'deconvolution' : 'h1');
  }

  /**
   * The sweep analysis of a channel (Farina: deconvolution, the linear impulse response
   * windowed away from the harmonic ones, H inside the swept range), or null when the stimulus
   * is not an exponential sweep or H1 was asked for.
   */
  sweepAnalysis(channel: number): SweepAnalysis | null {
    return memo(this.sweepAnalysisCache, channel, () => {
      const reference = this.reference(channel);
      const sweep = this.sweepOf(reference);
      if (!sweep || this.transferMethod(channel) !== 'deconvolution') return null;
      const deconvolver = memo(this.deconvolverCache, reference, () =>
        prepareSweepDeconvolution(reference, this.sampleRate, sweep, { captureLength: Math.max(this.frames, reference.length) }),
      );
      return analyzeSweepCapture(deconvolver, this.signal(channel));
    });
  }

  /**
   * Latency (fractional samples), polarity and ambiguity of a channel against the stimulus:
   * for a sweep the peak of the linear impulse response, otherwise GCC-PHAT with an
   * interpolated peak (Knapp & Carter 1976).
   */
  timing(channel: number): ChannelTiming {
    return memo(this.timingCache, channel, () => {
      const reference = this.reference(channel);
      const x = this.signal(channel);
      const sweep = this.sweepAnalysis(channel);
      let timing: ChannelTiming;
      const onsetGap = sweep ? Math.abs(onset(x) - (sweep.latencySamples + onset(reference))) : 0;
      if (sweep && onsetGap <= Math.max(0.01 * this.sampleRate, 0.02 * reference.length)) {
        const ir = sweep.linearIr;
        let peak = 0;
        for (let i = 1; i < ir.samples.length; i++) if (Math.abs(ir.samples[i] as number) > Math.abs(ir.samples[peak] as number)) peak = i;
        timing = { latencySamples: sweep.latencySeconds * this.sampleRate, polarity: (ir.samples[peak] as number) < 0 ? 'inverted' : 'normal', ambiguous: false, notFound: null, warnings: [] };
      } else {
        // Not a sweep, or its impulse-response peak disagrees with where the capture's signal
        // begins (a capture that lost most of the sweep): correlation decides.
        const estimate = measureLatency(reference, x);
        const warnings = [...estimate.warnings];
        if (sweep && estimate.found) warnings.push(`the sweep's impulse response puts the latency at ${sweep.latencySamples} samples, but the capture's signal begins ${Math.round(onsetGap)} samples away from there; the latency was taken from the correlation (${estimate.samples.toFixed(2)} samples)`);
        timing = { latencySamples: estimate.samples, polarity: estimate.polarity, ambiguous: estimate.ambiguous, notFound: estimate.found ? null : (estimate.warnings[0] ?? null), warnings };
      }
      this.warn(channel, 'timing', timing.warnings);
      return timing;
    });
  }

  /**
   * Whether the capture holds the stimulus's active part (its first to last sample above
   * −60 dB of its peak: trailing silence does not count) after the latency. Anything missing
   * is warned about; more than MAX_MISSING_FRACTION of it makes transfer measures an error.
   */
  coverage(channel: number): StimulusCoverage & { missingFraction: number } {
    return memo(this.coverageCache, channel, () => {
      const reference = this.reference(channel);
      let peak = 0;
      for (const v of reference) peak = Math.max(peak, Math.abs(v));
      let first = 0;
      let last = reference.length - 1;
      while (first < last && Math.abs(reference[first] as number) <= peak * 1e-3) first++;
      while (last > first && Math.abs(reference[last] as number) <= peak * 1e-3) last--;
      const timing = this.timing(channel);
      const latency = Math.round(timing.latencySamples);
      const coverage = checkStimulusCoverage({ stimulusLength: last + 1, captureLength: this.frames, latencySamples: latency, sampleRate: this.sampleRate });
      const missingAtStart = Math.max(0, -(latency + first));
      const missingFraction = (missingAtStart + coverage.missingAtEnd) / Math.max(1, last + 1 - first);
      // A stimulus that is not there is not "late" or "cut short": say it was not found instead.
      const warning = coverage.warning && timing.notFound ? timing.notFound : coverage.warning;
      const result = { ...coverage, warning, covered: missingFraction <= MAX_MISSING_FRACTION, missingFraction };
      if (warning) this.warn(channel, 'transfer', [warning]);
      return result;
    });
  }


  /** Capture lag against the stimulus in samples, with a fractional part. */
  latency(channel: number): number {
    return this.timing(channel).latencySamples;
  }

  /**
   * Delay of channel b after channel a in samples (fractional), with its polarity. Plain
   * (unweighted) correlation: both channels carry the same programme, so whitening only adds
   * the noise of empty bins (a 3-sample skew of a multitone reads 2.976 with PHAT, 3.0001 without).
   */
  channelDelay(a: number, b: number): ChannelDelay {
    return memo(this.delayCache, `${a}:${b}`, () => {
      const estimate = interChannelDelay(this.signal(a), this.signal(b), { weighting: 'none' });
      if (estimate.warnings.length) this.warn(b, 'timing', estimate.warnings.map((w) => `channel ${b} after channel ${a}: ${w}`));
      return { delaySamples: estimate.samples, polarity: estimate.polarity };
    });
  }

  /** Lag of channel b against channel a in samples. */
  interChannelDelay(a: number, b: number): number {
    return this.channelDelay(a, b).delaySamples;
  }

  /**
   * H = capture/stimulus with the bulk delay removed: for a sweep, the FFT of the windowed
   * linear impulse response inside the swept range; otherwise H1 (Welch, Gxy/Gxx) or a
   * regularised deconvolution of the aligned capture.
   * @throws MaskCheckError when the latency is ambiguous or the capture does not cover the stimulus
   */
  transfer(channel: number): ChannelTransfer {
    return memo(this.transferCache, channel, () => {
      const reference = this.reference(channel);
      const capture = this.signal(channel);
      // An ambiguous latency (a periodic stimulus) still gives |H|: a whole number of periods of
      // misalignment does not change a periodic signal's spectrum. Phase needs the latency, so
      // phaseFit refuses it.
      const timing = this.timing(channel);
      const coverage = this.coverage(channel);
      if (!coverage.covered) {
        if (timing.notFound) throw new MaskCheckError(`there is no transfer function to measure: ${timing.notFound}`);
        throw new MaskCheckError(`the capture does not hold the whole stimulus after its latency, so H would be wrong where the stimulus is missing: ${coverage.warning}`);
      }
      const sweep = this.sweepAnalysis(channel);
      let latencySamples: number;
      let tf: TransferFunction;
      if (sweep) {
        latencySamples = sweep.latencySamples;
        tf = sweep.transfer;
      } else {
        latencySamples = Math.round(timing.latencySamples);
        const aligned = new Float64Array(reference.length);
        for (let i = 0; i < reference.length; i++) {
          const j = i + latencySamples;
          aligned[i] = j >= 0 && j < capture.length ? (capture[j] as number) : 0;
        }
        tf = estimateTransferFunction(reference, aligned, this.sampleRate, { method: this.transferMethod(channel) });
      }
      const mag2 = new Float64Array(tf.re.length);
      for (let k = 0; k < mag2.length; k++) if (tf.valid[k]) mag2[k] = (tf.re[k] as number) ** 2 + (tf.im[k] as number) ** 2;
      return { latencySamples, tf, mag2 };
    });
  }

  /** H1 coherence γ² per bin of the aligned capture against the stimulus; null for deconvolution. */
  coherence(channel: number): CoherenceResult | null {
    return memo(this.coherenceCache, channel, () => {
      if (this.transferMethod(channel) !== 'h1') return null;
      const reference = this.reference(channel);
      const capture = this.signal(channel);
      const lag = Math.round(this.transfer(channel).latencySamples);
      const aligned = new Float64Array(reference.length);
      for (let i = 0; i < reference.length; i++) {
        const j = i + lag;
        aligned[i] = j >= 0 && j < capture.length ? (capture[j] as number) : 0;
      }
      return coherence(reference, aligned, this.sampleRate);
    });
  }

  /** |H|-weighted linear-phase fit over a band (default: |H| within 20 dB of its maximum); null with < 3 bins. */
  phaseFit(channel: number, bandHz: readonly [number, number] | undefined): PhaseFit | null {
    const timing = this.timing(channel);
    if (timing.ambiguous) throw new MaskCheckError(`phase and group delay need an unambiguous latency: ${timing.warnings.join('; ') || 'the stimulus repeats, so several delays fit equally well'}`);
    const key = `${channel}:${bandHz ? bandHz.join('-') : 'auto'}`;
    const hit = this.phaseCache.get(key);
    if (hit !== undefined) return hit;
    const fit = fitLinearPhase(this.transfer(channel), this.sampleRate, bandHz);
    this.phaseCache.set(key, fit);
    return fit;
  }

  /**
   * Tone and noise measures over a band (default 20 Hz … min(20 kHz, fs/2)) and the channel's
   * steady window: with a stimulus whose latency is unambiguous, the stimulus's own steady part
   * (its onset, fades and end) shifted by the latency; otherwise the capture's in-band level
   * plateau. THD, THD+N, SNR and the noise floor through the AES17 low-pass, weighting on the
   * noise only.
   */
  distortion(channel: number, bandHz: readonly [number, number] | undefined): ChannelDistortion {
    const band = bandHz ? ([bandHz[0], Math.min(bandHz[1], this.sampleRate / 2)] as const) : ([20, Math.min(20000, this.sampleRate / 2)] as const);
    if (!(band[1] > band[0])) throw new MaskCheckError(`the band ${band[0]}…${bandHz?.[1] ?? band[1]} Hz lies above half the sample rate (${this.sampleRate / 2} Hz)`);
    return memo(this.distortionCache, `${channel}:${band.join('-')}`, () => {
      const x = this.signal(channel);
      if (x.length < 64) throw new MaskCheckError(`distortion measures need at least 64 samples (the capture holds ${x.length})`);
      if (this.hasReference && this.sweepAnalysis(channel)) return this.sweepHasNoTone(channel, band);
      const timing = this.hasReference ? this.timing(channel) : null;
      const stimulusWindow = timing && !timing.ambiguous ? { stimulus: this.reference(channel), latencySamples: Math.round(timing.latencySamples) } : undefined;
      const result = measureToneDistortion(x, this.sampleRate, { bandHz: band, bandPlans: this.bandPlans, ...(stimulusWindow ? { stimulusWindow } : {}) });
      const w = result.window;
      const steadyNotes: string[] = [];
      if (w.trimmedLeadIn || w.trimmedTail) {
        const parts = [w.trimmedLeadIn ? `a lead-in of ${(w.start / this.sampleRate).toFixed(3)} s` : null, w.trimmedTail ? `a tail of ${((x.length - w.end) / this.sampleRate).toFixed(3)} s` : null].filter(Boolean);
        steadyNotes.push(`distortion and noise were measured on the steady part ${(w.start / this.sampleRate).toFixed(3)}…${(w.end / this.sampleRate).toFixed(3)} s; ${parts.join(' and ')} ${parts.length > 1 ? 'were' : 'was'} left out`);
      }
      this.warn(channel, 'steady', steadyNotes);
      this.warn(channel, 'tone', result.warnings);
      return result;
    });
  }

  /** Records why a channel has no transfer estimate (the report shows it among the warnings). */
  noteTransferUnavailable(channel: number, why: string): void {
    this.warn(channel, 'transfer', [`no transfer function: ${why}`]);
  }

  /** Tone measures of a sweep capture: none (a sweep has no steady tone); its distortion is reported per band. */
  private sweepHasNoTone(channel: number, band: readonly [number, number]): ChannelDistortion {
    const warning = 'the stimulus is an exponential sweep: harmonic distortion is reported per band (distortion versus frequency); THD, THD+N, SNR and the noise floor need a steady tone or silence';
    this.warn(channel, 'tone', [warning]);
    return {
      tone: null,
      bandHz: [band[0], band[1]],
      noisePower: Number.NaN,
      noisePowerA: Number.NaN,
      noiseFloorDbfs: null,
      noiseFloorDbfsA: null,
      warnings: [warning],
      window: { start: 0, end: this.frames, trimmedLeadIn: false, trimmedTail: false, reason: 'a sweep has no steady part' },
      dc: this.levels(channel).dcOffset,
      dynamicRangeDb: null,
    };
  }

  /**
   * Frees a channel's large intermediates (spectra, transfer estimate, sweep analysis) once its
   * report is written, so an 8-channel capture holds one channel's worth at a time. Later calls
   * recompute them.
   */
  release(channel: number): void {
    this.spectrumCache.delete(channel);
    this.transferCache.delete(channel);
    this.sweepAnalysisCache.delete(channel);
    this.coherenceCache.delete(channel);
    for (const key of [...this.phaseCache.keys()]) if (key.startsWith(`${channel}:`)) this.phaseCache.delete(key);
  }

  /** SMPTE/DIN intermodulation of a two-tone capture (IEC 60268-3). */
  imdSmpte(channel: number): ImdSmpteResult {
    return memo(this.imdSmpteCache, channel, () => measureImdSmpte(this.signal(channel), this.sampleRate));
  }

  /** Difference-frequency distortion of a twin-tone capture (IEC 60268-3). */
  imdTwinTone(channel: number): ImdTwinToneResult {
    return memo(this.imdTwinCache, channel, () => measureImdTwinTone(this.signal(channel), this.sampleRate));
  }

  /** Separation of an undriven channel from the driven one per 1/3-octave band, dB (positive: quieter). */
  crosstalk(driven: number, other: number): { centerHz: number; separationDb: number; noiseLimited: boolean }[] {
    this.signal(other);
    const result = memo(this.crosstalkCache, driven, () => measureCrosstalk(this.input.capture.channels, this.sampleRate, driven));
    const bands = result.channels.find((c) => c.channel === other)?.bands ?? [];
    return bands.map((b) => ({ centerHz: b.nominalHz, separationDb: b.separationDb, noiseLimited: b.noiseLimited }));
  }

  /** Dropouts: gaps of at least `minDurationMs` far below the surrounding level, inside the capture. */
  dropouts(channel: number, minDurationMs: number): { startSample: number; lengthSamples: number }[] {
    return memo(this.dropoutCache, `${channel}:${minDurationMs}`, () =>
      detectDropoutGaps(this.signal(channel), this.sampleRate, { minDurationMs }).map((g) => ({ startSample: g.startSample, lengthSamples: g.lengthSamples })),
    );
  }

  /** First samples of discontinuities (clicks, steps, lost blocks) by linear-prediction residual. */
  discontinuities(channel: number): number[] {
    return memo(this.glitchCache, channel, () => detectGlitches(this.signal(channel), this.sampleRate).map((g) => g.sample));
  }

  /** Runs of samples stuck at the record's extreme value (see measures/clipping.ts). */
  clipping(channel: number): ClippingReport {
    return memo(this.clipCache, channel, () => detectClipping(this.signal(channel)));
  }

  /** Samples in clipped runs. */
  clippedSamples(channel: number): number {
    return this.clipping(channel).clippedSamples;
  }

  /** Clock drift of the capture against the stimulus in ppm; null when the record cannot show it. */
  driftPpm(channel: number): number | null {
    return memo(this.driftCache, channel, () => {
      const timing = this.timing(channel);
      if (timing.ambiguous) return null;
      return measureClockDrift(this.reference(channel), this.signal(channel), this.sampleRate, { latencySamples: timing.latencySamples })?.ppm ?? null;
    });
  }

  /** Smallest H1 coherence over the band (default: every bin with stimulus energy) and where; null for deconvolution. */
  coherenceMinAt(channel: number, bandHz: readonly [number, number] | undefined): { value: number; hz: number } | null {
    const c = this.coherence(channel);
    if (!c) return null;
    const band = bandHz ?? [c.binHz, this.sampleRate / 2];
    const found = minimumCoherence(c, band[0], band[1]);
    if (!found) return null;
    if (found.gamma2 < LOW_COHERENCE) {
      this.warn(channel, 'transfer', [`coherence falls to ${found.gamma2.toFixed(3)} at ${Math.round(found.atHz)} Hz: the output there holds noise, distortion or a changing path that the stimulus does not explain, so |H| is less reliable`]);
    }
    return { value: found.gamma2, hz: found.atHz };
  }

  /** Smallest H1 coherence over the band; null for deconvolution. */
  coherenceMin(channel: number, bandHz: readonly [number, number] | undefined): number | null {
    return this.coherenceMinAt(channel, bandHz)?.value ?? null;
  }


  /** H2, H3 and THD per 1/3-octave band from a sweep's harmonic responses (sweeps only, else empty). */
  distortionVsFrequency(channel: number): { centerHz: number; h2Percent: number | null; h3Percent: number | null; thdPercent: number | null }[] {
    const sweep = this.sweepAnalysis(channel);
    if (!sweep) return [];
    return sweepDistortionByBand(sweep).map((b) => ({ centerHz: b.centerHz, h2Percent: b.h2Percent, h3Percent: b.h3Percent, thdPercent: b.thdPercent }));
  }

}
