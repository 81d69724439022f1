import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { steadyStateRange } from '../measures/steady-state.js';
import { defaultBand, measureDistortion, type DistortionResult } from '../measures/distortion.js';
import { detectDiscontinuities, detectDropouts, type DropoutRun } from '../measures/integrity.js';
import { measureLevels, spectralEnergy, type SignalLevels } from '../measures/levels.js';
import { createWindow } from '../spectrum/windows.js';
import { estimateLatency } from '../transfer/fft-convolution.js';
import { estimateTransferFunction, type TransferFunction } from '../transfer/transfer-function.js';
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
  warnings: string[];
}

/** Delay of channel b after channel a. */
export interface ChannelDelay {
  delaySamples: number;
  polarity: 'normal' | 'inverted';
}

/** The steady part of one channel that every distortion and noise measure uses. */
export interface SteadyWindow {
  start: number;
  end: number;
  warnings: string[];
}

/** Tone and noise measures of one channel over one band (see measures/distortion.ts). */
export interface ChannelDistortion extends DistortionResult {
  window: SteadyWindow;
  warnings: string[];
}

/** What a warning concerns, so a check shows only the warnings of the measures it used. */
export type WarningTopic = 'stimulus' | 'timing' | 'transfer' | 'steady' | 'tone' | 'integrity';

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
  private readonly levelCache = new Map<string, SignalLevels>();
  private readonly parsevalCache = new Map<number, { time: number; frequency: number; relativeError: number }>();
  private readonly spectrumCache = new Map<number, LevelSpectrum>();
  private readonly transferCache = new Map<number, ChannelTransfer>();
  private readonly phaseCache = new Map<string, PhaseFit | null>();
  private readonly distortionCache = new Map<string, ChannelDistortion>();
  private readonly timingCache = new Map<number, ChannelTiming>();
  private readonly delayCache = new Map<string, ChannelDelay>();
  private readonly steadyCache = new Map<number, SteadyWindow>();
  private readonly dropoutCache = new Map<string, DropoutRun[]>();
  private readonly glitchCache = new Map<number, number[]>();
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

  plan(size: number): RealFftPlan {
    return memo(this.plans, size, () => createRealFftPlan(size));
  }

  /** RMS, peak, crest factor, DC and clipped samples over [from, to) samples. */
  levels(channel: number, from = 0, to = this.frames, clipThreshold?: number): SignalLevels {
    const key = `${channel}:${from}:${to}:${clipThreshold ?? ''}`;
    return memo(this.levelCache, key, () => measureLevels(this.signal(channel).subarray(from, to), clipThreshold));
  }

  /** Energy in both domains: Σx² and (1/N)·Σ|X[k]|² of the zero-padded rectangular FFT (Parseval). */
  energy(channel: number): { time: number; frequency: number; relativeError: number } {
    return memo(this.parsevalCache, channel, () => {
      const x = this.signal(channel);
      const plan = this.plan(Math.max(2, nextPowerOfTwo(x.length)));
      const buf = new Float64Array(plan.size);
      buf.set(x);
      const re = new Float64Array(plan.bins);
      const im = new Float64Array(plan.bins);
      plan.forward(buf, re, im);
      const frequency = spectralEnergy(re, im, plan.size);
      const time = this.levels(channel).energy;
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
      const w = createWindow('hann', x.length, 'periodic');
      let sumW = 0;
      let sumW2 = 0;
      const buf = new Float64Array(plan.size);
      for (let i = 0; i < x.length; i++) {
        const wi = w[i] as number;
        sumW += wi;
        sumW2 += wi * wi;
        buf[i] = (x[i] as number) * wi;
      }
      const re = new Float64Array(plan.bins);
      const im = new Float64Array(plan.bins);
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
      return { binHz: this.sampleRate / plan.size, power, amplitude2 };
    });
  }

  /** Latency (fractional samples), polarity and ambiguity of a channel against the stimulus. */
  timing(channel: number): ChannelTiming {
    return memo(this.timingCache, channel, () => {
      const reference = this.reference(channel);
      const x = this.signal(channel);
      const lag = estimateLatency(reference, x);
      let dot = 0;
      for (let i = 0; i < reference.length; i++) {
        const j = i + lag;
        if (j >= 0 && j < x.length) dot += (reference[i] as number) * (x[j] as number);
      }
      const timing: ChannelTiming = { latencySamples: lag, polarity: dot < 0 ? 'inverted' : 'normal', ambiguous: false, warnings: [] };
      this.warn(channel, 'timing', timing.warnings);
      return timing;
    });
  }

  /** Capture lag against the stimulus in samples, with a fractional part. */
  latency(channel: number): number {
    return this.timing(channel).latencySamples;
  }

  /** Delay of channel b after channel a in samples, with its polarity. */
  channelDelay(a: number, b: number): ChannelDelay {
    return memo(this.delayCache, `${a}:${b}`, () => {
      const xa = this.signal(a);
      const xb = this.signal(b);
      const lag = estimateLatency(xa, xb);
      let dot = 0;
      for (let i = 0; i < xa.length; i++) {
        const j = i + lag;
        if (j >= 0 && j < xb.length) dot += (xa[i] as number) * (xb[j] as number);
      }
      return { delaySamples: lag, polarity: dot < 0 ? 'inverted' : 'normal' };
    });
  }

  /** Lag of channel b against channel a in samples. */
  interChannelDelay(a: number, b: number): number {
    return this.channelDelay(a, b).delaySamples;
  }

  /** H = capture/stimulus with the bulk delay removed first. */
  transfer(channel: number): ChannelTransfer {
    return memo(this.transferCache, channel, () => {
      const reference = this.reference(channel);
      const capture = this.signal(channel);
      const latencySamples = Math.round(this.latency(channel));
      const aligned = new Float64Array(reference.length);
      for (let i = 0; i < reference.length; i++) {
        const j = i + latencySamples;
        aligned[i] = j >= 0 && j < capture.length ? (capture[j] as number) : 0;
      }
      const tf = estimateTransferFunction(reference, aligned, this.sampleRate, { method: this.input.transferMethod ?? 'h1' });
      const mag2 = new Float64Array(tf.re.length);
      for (let k = 0; k < mag2.length; k++) if (tf.valid[k]) mag2[k] = (tf.re[k] as number) ** 2 + (tf.im[k] as number) ** 2;
      return { latencySamples, tf, mag2 };
    });
  }

  /** |H|-weighted linear-phase fit over a band (default: |H| within 20 dB of its maximum); null with < 3 bins. */
  phaseFit(channel: number, bandHz: readonly [number, number] | undefined): PhaseFit | null {
    const key = `${channel}:${bandHz ? bandHz.join('-') : 'auto'}`;
    const hit = this.phaseCache.get(key);
    if (hit !== undefined) return hit;
    const fit = fitLinearPhase(this.transfer(channel), this.sampleRate, bandHz);
    this.phaseCache.set(key, fit);
    return fit;
  }

  /** The steady part of a channel that distortion and noise measures use. */
  steadyWindow(channel: number): SteadyWindow {
    return memo(this.steadyCache, channel, () => {
      const x = this.signal(channel);
      const [start, end] = x.length >= 64 ? steadyStateRange(x, this.sampleRate) : [0, x.length];
      const window: SteadyWindow = { start, end, warnings: [] };
      this.warn(channel, 'steady', window.warnings);
      return window;
    });
  }

  /** Sine fit, THD, THD+N, SNR and noise floor over a band (default 20 Hz … min(20 kHz, fs/2)). */
  distortion(channel: number, bandHz: readonly [number, number] | undefined): ChannelDistortion {
    const band = bandHz ? ([bandHz[0], Math.min(bandHz[1], this.sampleRate / 2)] as const) : defaultBand(this.sampleRate);
    if (!(band[1] > band[0])) throw new MaskCheckError(`the band ${band[0]}…${bandHz?.[1] ?? band[1]} Hz lies above half the sample rate (${this.sampleRate / 2} Hz)`);
    return memo(this.distortionCache, `${channel}:${band.join('-')}`, () => {
      const x = this.signal(channel);
      if (x.length < 64) throw new MaskCheckError(`distortion measures need at least 64 samples (the capture holds ${x.length})`);
      const window = this.steadyWindow(channel);
      const steady = window.start === 0 && window.end === x.length ? x : x.subarray(window.start, window.end);
      const d = measureDistortion(steady, this.sampleRate, { bandHz: band, plan: this.plan(nextPowerOfTwo(steady.length)) });
      const result: ChannelDistortion = { ...d, window, warnings: [] };
      this.warn(channel, 'tone', result.warnings);
      return result;
    });
  }

  /** Dropouts: gaps of at least `minDurationMs` inside the capture. */
  dropouts(channel: number, minDurationMs: number): DropoutRun[] {
    return memo(this.dropoutCache, `${channel}:${minDurationMs}`, () => detectDropouts(this.signal(channel), this.sampleRate, minDurationMs));
  }

  /** Sample indices of discontinuities (clicks, steps). */
  discontinuities(channel: number): number[] {
    return memo(this.glitchCache, channel, () => detectDiscontinuities(this.signal(channel)));
  }

  /** Clipped samples (see measures/levels.ts). */
  clippedSamples(channel: number): number {
    return this.levels(channel).clippedSamples;
  }

  /** Smallest H1 coherence over the band and where; null for deconvolution. */
  coherenceMinAt(channel: number, bandHz: readonly [number, number] | undefined): { value: number; hz: number } | null {
    void channel;
    void bandHz;
    return null;
  }

  /** Smallest H1 coherence over the band; null for deconvolution. */
  coherenceMin(channel: number, bandHz: readonly [number, number] | undefined): number | null {
    return this.coherenceMinAt(channel, bandHz)?.value ?? null;
  }

  /** Separation of an undriven channel from the driven one per 1/3-octave band, dB. */
  crosstalk(driven: number, other: number): { centerHz: number; separationDb: number }[] {
    void driven;
    void other;
    return [];
  }

  /** H2, H3 and THD per 1/3-octave band from a sweep's harmonic responses (sweeps only). */
  distortionVsFrequency(channel: number): { centerHz: number; h2Percent: number | null; h3Percent: number | null; thdPercent: number | null }[] {
    void channel;
    return [];
  }

  /** Clock drift of the capture against the stimulus, ppm. */
  driftPpm(channel: number): number | null {
    void channel;
    return null;
  }
}
