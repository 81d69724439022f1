import { createRealFftPlan, type RealFftPlan } from '../fft/real-fft.js';
import { steadyStateRange } from '../measures/steady-state.js';
import { defaultBand, measureDistortion, type DistortionResult } from '../measures/distortion.js';
import { measureLevels, spectralEnergy, type SignalLevels } from '../measures/levels.js';
import { createWindow } from '../spectrum/windows.js';
import { estimateLatency } from '../transfer/fft-convolution.js';
import { estimateTransferFunction, type TransferFunction } from '../transfer/transfer-function.js';
import { nextPowerOfTwo } from '../util/preconditions.js';
import { MaskCheckError } from './mask-check-error.js';
import type { EvaluateMaskInput } from './mask-input.js';
import { fitLinearPhase, type PhaseFit } from './phase-fit.js';

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
  latencySamples: number;
  tf: TransferFunction;
  /** |H|² per bin; 0 where the stimulus has no energy (tf.valid = 0). */
  mag2: Float64Array;
}

function memo<K, V>(cache: Map<K, V>, key: K, make: () => V): V {
  const hit = cache.get(key);
  if (hit !== undefined) return hit;
  const value = make();
  cache.set(key, value);
  return value;
}

/**
 * Every intermediate a mask's checks share, computed on first use and kept for the other
 * checks of the same evaluation (one transfer function, one sine fit per band, one level
 * spectrum per channel), so a mask costs what its checks need and no more.
 */
export class MaskContext {
  readonly sampleRate: number;
  readonly frames: number;
  /** Channels a check without `channels` covers. */
  readonly defaultChannels: readonly number[];
  private readonly plans = new Map<number, RealFftPlan>();
  private readonly levelCache = new Map<string, SignalLevels>();
  private readonly parsevalCache = new Map<number, number>();
  private readonly spectrumCache = new Map<number, LevelSpectrum>();
  private readonly transferCache = new Map<number, ChannelTransfer>();
  private readonly phaseCache = new Map<string, PhaseFit | null>();
  private readonly distortionCache = new Map<string, DistortionResult>();
  private readonly latencyCache = new Map<string, number>();

  constructor(
    readonly input: EvaluateMaskInput,
    defaultChannels: readonly number[],
  ) {
    this.sampleRate = input.capture.sampleRate;
    this.frames = input.capture.channels[0]?.length ?? 0;
    this.defaultChannels = defaultChannels;
  }

  /** A channel's samples; a channel the capture lacks is the check's error. */
  signal(channel: number): Float64Array {
    const x = this.input.capture.channels[channel];
    if (!x) throw new MaskCheckError(`channel ${channel} does not exist (the capture has ${this.input.capture.channels.length})`);
    return x;
  }

  /** The stimulus for a channel (a mono stimulus serves every channel). */
  reference(channel: number): Float64Array {
    const ref = this.input.reference;
    if (!ref) throw new MaskCheckError('this check compares the capture with its stimulus, and no stimulus (reference) was given');
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

  /** |E_freq − E_time|/E_time of the zero-padded rectangular FFT (Parseval), 0 for silence. */
  parsevalError(channel: number): number {
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
      return time > 0 ? Math.abs(frequency - time) / time : Math.abs(frequency);
    });
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

  /** Capture lag against the stimulus in samples (largest |cross-correlation|). */
  latency(channel: number): number {
    return memo(this.latencyCache, `ref:${channel}`, () => estimateLatency(this.reference(channel), this.signal(channel)));
  }

  /** Lag of channel b against channel a in samples. */
  interChannelDelay(a: number, b: number): number {
    return memo(this.latencyCache, `${a}:${b}`, () => estimateLatency(this.signal(a), this.signal(b)));
  }

  /** H = capture/stimulus with the bulk delay removed first, exactly as `analyzeCapture` does. */
  transfer(channel: number): ChannelTransfer {
    return memo(this.transferCache, channel, () => {
      const reference = this.reference(channel);
      const capture = this.signal(channel);
      const latencySamples = this.latency(channel);
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

  /** Sine fit, THD, THD+N, SNR and noise floor over a band (default 20 Hz … min(20 kHz, fs/2)). */
  distortion(channel: number, bandHz: readonly [number, number] | undefined): DistortionResult {
    const band = bandHz ? ([bandHz[0], Math.min(bandHz[1], this.sampleRate / 2)] as const) : defaultBand(this.sampleRate);
    if (!(band[1] > band[0])) throw new MaskCheckError(`the band ${band[0]}…${bandHz?.[1] ?? band[1]} Hz lies above half the sample rate (${this.sampleRate / 2} Hz)`);
    return memo(this.distortionCache, `${channel}:${band.join('-')}`, () => {
      const x = this.signal(channel);
      if (x.length < 64) throw new MaskCheckError(`distortion measures need at least 64 samples (the capture holds ${x.length})`);
      // Skip a latency lead-in or a tail of silence: missing tone there is not distortion.
      const [start, end] = steadyStateRange(x, this.sampleRate);
      const steady = start === 0 && end === x.length ? x : x.subarray(start, end);
      return measureDistortion(steady, this.sampleRate, { bandHz: band, plan: this.plan(nextPowerOfTwo(steady.length)) });
    });
  }
}
