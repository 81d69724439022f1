// Field reports 9, 10, 15 and 16: periodic stimuli, polarity and sub-sample skew, a mono capture
// of a stereo stimulus, and the report agreeing with the verdict — through analyzeCapture and
// evaluateMask only. Captures carry 24-bit TPDF idle noise in their latency.
import { describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { analyzeCapture, evaluateMask, stimulusAsPlayed } from '../../src/index.js';
import { cubic, delayed, tpdfQuantise } from '../audio-band/capture-signals.js';
import { add, fractionalDelay, tpdfDither } from '../timing/timing-signals.js';
import { checkOf, mask } from './real-capture-helpers.js';

const FS = 48000;

describe('report 9: a periodic stimulus leaves the latency undetermined', () => {
  // A 1 kHz sine as long as the capture, which is the same sine 100 samples late: every lag
  // 48·k + 100 fits equally well (the period is 48 samples), so no latency can be claimed.
  const stimulus = stimulusAsPlayed(StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 1, levelDbfs: -6, frequency: 1000 }));
  const x = stimulus.channels[0] as Float64Array;
  const capture = { sampleRate: FS, channels: [add(delayed(x, 100).subarray(0, x.length), tpdfDither(x.length, 24, 9))] };

  it('makes a latency-ms check an error, not a number', () => {
    const result = evaluateMask({ capture, reference: stimulus }, mask({ id: 'latency', kind: 'timing', metric: 'latency-ms', min: 0, max: 10 }));
    const latency = checkOf(result, 'latency');
    // docs/masks.md, timing: an ambiguous latency is an error rather than a confident wrong number.
    expect(latency.measured).toBeNull();
    expect(latency.error ?? '').toMatch(/ambiguous/);
    expect(result.verdict).toBe('error');
  });

  it('lets analyzeCapture report the ambiguity as a warning instead of throwing', () => {
    let report: ReturnType<typeof analyzeCapture> | undefined;
    // The report's own measures (levels, THD+N of the tone) do not need the alignment.
    expect(() => {
      report = analyzeCapture(capture, { reference: stimulus });
    }).not.toThrow();
    const c = report?.channels[0];
    expect(c?.warnings.some((w) => /ambiguous/.test(w))).toBe(true);
    expect(c?.thdnDb).not.toBeNull();
  });
});

describe('report 10: polarity and sub-sample skew between channels', () => {
  // Pink noise with 20 ms fades: silent at both ends, so the FFT shift theorem delays it exactly
  // (timing-signals.ts, Oppenheim & Schafer §8.5).
  const stimulus = stimulusAsPlayed(StimulusSpec.parse({ kind: 'pink-noise', sampleRate: FS, seconds: 1, levelDbfs: -20, fadeInSeconds: 0.02, fadeOutSeconds: 0.02, seed: 4 }));
  const x = stimulus.channels[0] as Float64Array;
  const length = x.length + 1000;
  const channel = (delaySamples: number, sign: number, seed: number): Float64Array => add(fractionalDelay(x, delaySamples, length).map((v) => sign * v), tpdfDither(length, 24, seed));
  const checks = mask({ id: 'skew', kind: 'timing', metric: 'inter-channel-delay-ms', min: -1, max: 1 }, { id: 'polarity', kind: 'timing', metric: 'polarity' });

  it('reads channel 1, inverted and 2.5 samples later, as 2.5 samples and fails polarity on it', () => {
    const capture = { sampleRate: FS, channels: [channel(100, 1, 1), channel(102.5, -1, 2)] };
    const result = evaluateMask({ capture, reference: stimulus }, checks);
    const skew = checkOf(result, 'skew');
    // Built 2.5 samples apart; ±0.05 samples (the field report's tolerance). In ms: 2.5/48.
    expect(Math.abs((skew.details.delaySamples as number) - 2.5)).toBeLessThan(0.05);
    expect(Math.abs((skew.measured ?? 0) - 2.5 / 48)).toBeLessThan(0.05 / 48);
    expect(skew.details.polarity).toBe('inverted');
    const polarity = checkOf(result, 'polarity');
    expect(polarity.pass).toBe(false);
    expect(polarity.channel).toBe(1);
    const perChannel = polarity.details.perChannel as { channel: number; pass: boolean }[];
    expect(perChannel.map((p) => [p.channel, p.pass])).toEqual([
      [0, true],
      [1, false],
    ]);
  });

  it('reads a 0.5-sample skew as 0.5 ± 0.02 samples, with both channels in polarity', () => {
    const capture = { sampleRate: FS, channels: [channel(100, 1, 3), channel(100.5, 1, 4)] };
    const result = evaluateMask({ capture, reference: stimulus }, checks);
    // Built 0.5 samples apart; ±0.02 samples (the field report's tolerance).
    expect(Math.abs((checkOf(result, 'skew').details.delaySamples as number) - 0.5)).toBeLessThan(0.02);
    expect(checkOf(result, 'polarity').pass).toBe(true);
  });
});

describe('report 15: a mono capture of a stereo stimulus', () => {
  it('warns which stimulus channel the capture was compared with, and uses it', () => {
    // Independent noise per stimulus channel: only channel 0 explains the capture.
    const stimulus = stimulusAsPlayed(StimulusSpec.parse({ kind: 'pink-noise', sampleRate: FS, channels: 2, independentChannels: true, seconds: 1, levelDbfs: -20, seed: 3 }));
    const capture = { sampleRate: FS, channels: [add(delayed(stimulus.channels[0] as Float64Array, 240), tpdfDither(FS + 240, 24, 5))] };
    const c = analyzeCapture(capture, { reference: stimulus }).channels[0];
    expect(c?.warnings.some((w) => /stimulus has 2 channels/.test(w) && /stimulus channel 0/.test(w))).toBe(true);
    // Built 240 samples late; ±0.05 samples as in report 10.
    expect(Math.abs((c?.transfer?.latencySamples ?? 0) - 240)).toBeLessThan(0.05);
  });
});

describe('report 16: the report and the verdict read the same numbers', () => {
  const checks = mask(
    { id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: 0 },
    { id: 'snr', kind: 'distortion', metric: 'snr-db', min: 0 },
    { id: 'floor', kind: 'distortion', metric: 'noise-floor-dbfs', max: 0 },
  );

  it('a faded tone through y = x + 0.02·x³, 10 ms late, analysed with its stimulus', () => {
    const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 1, levelDbfs: -3, frequency: 997, fadeInSeconds: 0.05, fadeOutSeconds: 0.05 });
    const stimulus = stimulusAsPlayed(spec);
    const capture = { sampleRate: FS, channels: [tpdfQuantise(delayed(cubic(stimulus.channels[0] as Float64Array, 0.02), 480), 24, 1)] };
    // A tone test case always comes with its stimulus: the report must come back, and every
    // number it shares with the mask must be the same number (one CaptureContext, docs/analysis.md).
    let report: ReturnType<typeof analyzeCapture> | undefined;
    expect(() => {
      report = analyzeCapture(capture, { reference: stimulus });
    }).not.toThrow();
    const c = report?.channels[0];
    const result = evaluateMask({ capture, reference: stimulus }, checks);
    expect(checkOf(result, 'thdn').measured).toBe(c?.thdnDb);
    expect(checkOf(result, 'snr').measured).toBe(c?.snrDb);
    expect(checkOf(result, 'floor').measured).toBe(c?.noiseFloorDbfs);
  });

  it('a 24-bit tone capture without stimulus, and a pink-noise capture with its stimulus', () => {
    const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 1, levelDbfs: -3, frequency: 997, fadeInSeconds: 0.05, fadeOutSeconds: 0.05 });
    const tone = { sampleRate: FS, channels: [tpdfQuantise(delayed(cubic(stimulusAsPlayed(spec).channels[0] as Float64Array, 0.02), 480), 24, 1)] };
    const c = analyzeCapture(tone).channels[0];
    const result = evaluateMask({ capture: tone }, checks);
    expect(c?.thdnDb).not.toBeNull();
    expect(checkOf(result, 'thdn').measured).toBe(c?.thdnDb);
    expect(checkOf(result, 'snr').measured).toBe(c?.snrDb);
    expect(checkOf(result, 'floor').measured).toBe(c?.noiseFloorDbfs);

    const noiseStimulus = stimulusAsPlayed(StimulusSpec.parse({ kind: 'pink-noise', sampleRate: FS, seconds: 1, levelDbfs: -20, fadeInSeconds: 0.02, fadeOutSeconds: 0.02, seed: 6 }));
    const noise = { sampleRate: FS, channels: [add(fractionalDelay(noiseStimulus.channels[0] as Float64Array, 480.3, FS + 960), tpdfDither(FS + 960, 24, 7))] };
    const t = analyzeCapture(noise, { reference: noiseStimulus }).channels[0]?.transfer;
    const latency = checkOf(evaluateMask({ capture: noise, reference: noiseStimulus }, mask({ id: 'latency', kind: 'timing', metric: 'latency-ms', min: 0, max: 100 })), 'latency');
    expect(latency.measured).toBe(t?.latencyMs);
    expect(latency.details.latencySamples).toBe(t?.latencySamples);
    // And both are right: built 480.3 samples late (±0.05 samples).
    expect(Math.abs((t?.latencySamples ?? 0) - 480.3)).toBeLessThan(0.05);
  });
});
