// Complete specs (defaults filled in, as zod's StimulusSpec would) for tests to vary.
import type { MultitoneSpec, PinkNoiseSpec, SineSpec, WhiteNoiseSpec } from '@earmark/contracts';

export function sineSpec(p: Partial<SineSpec> = {}): SineSpec {
  return { kind: 'sine', sampleRate: 48000, channels: 1, seconds: 0.1, levelDbfs: -20, frequency: 1000, fadeInSeconds: 0, fadeOutSeconds: 0, ...p };
}

export function multitoneSpec(p: Partial<MultitoneSpec> = {}): MultitoneSpec {
  return {
    kind: 'multitone', sampleRate: 48000, channels: 1, seconds: 0.1, levelDbfs: -20, from: 100, to: 6400, count: 64,
    spacing: 'linear', phases: 'schroeder', seed: 0, fadeInSeconds: 0, fadeOutSeconds: 0, ...p,
  };
}

export function whiteSpec(p: Partial<WhiteNoiseSpec> = {}): WhiteNoiseSpec {
  return { kind: 'white-noise', sampleRate: 48000, channels: 1, seconds: 0.5, levelDbfs: -20, seed: 1, independentChannels: false, fadeInSeconds: 0, fadeOutSeconds: 0, ...p };
}

export function pinkSpec(p: Partial<PinkNoiseSpec> = {}): PinkNoiseSpec {
  return { kind: 'pink-noise', sampleRate: 48000, channels: 1, seconds: 0.5, levelDbfs: -20, seed: 1, independentChannels: false, fadeInSeconds: 0, fadeOutSeconds: 0, ...p };
}

export function rms(x: Float64Array): number {
  let s = 0;
  for (const v of x) s += v * v;
  return Math.sqrt(s / x.length);
}

export function peak(x: Float64Array): number {
  let p = 0;
  for (const v of x) p = Math.max(p, Math.abs(v));
  return p;
}
