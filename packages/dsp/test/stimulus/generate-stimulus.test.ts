import { describe, expect, it } from 'vitest';
import type { ImpulseSpec, SilenceSpec, StimulusSpec } from '@earmark/contracts';
import { StimulusError, generateStimulus, type StimulusErrorCode } from '../../src/stimulus/index.js';
import { hasPythonScipy, runPython } from '../io/python-oracle.js';
import { multitoneSpec, peak, pinkSpec, rms, sineSpec, whiteSpec } from './spec-fixtures.js';

function stimulusError(spec: StimulusSpec): StimulusError {
  try {
    generateStimulus(spec);
  } catch (e) {
    if (e instanceof StimulusError) return e;
    throw e;
  }
  throw new Error('generateStimulus accepted the spec');
}

describe('generateStimulus levels (AES17: a full-scale sine is 0 dBFS)', () => {
  it('a sine at L dBFS has amplitude 10^(L/20) and RMS 10^(L/20)/√2', () => {
    const x = generateStimulus(sineSpec({ levelDbfs: -20 })).channels[0] ?? new Float64Array();
    expect(x.length).toBe(4800);
    expect(rms(x)).toBeCloseTo(0.1 / Math.SQRT2, 12); // 100 whole periods of 1 kHz
    expect(peak(x)).toBeLessThanOrEqual(0.1);
    expect(peak(x)).toBeGreaterThan(0.1 * 0.9999);
  });

  it.skipIf(!hasPythonScipy())('a sine is a single line at its frequency (numpy rfft)', () => {
    const x = generateStimulus(sineSpec({ frequency: 1250, levelDbfs: -6 })).channels[0] ?? new Float64Array();
    const r = runPython(
      'X = np.abs(np.fft.rfft(IN["x"])) * 2 / len(IN["x"])\nk = int(np.argmax(X))\nX[k] = 0\nprint(json.dumps([k * 10, float(np.abs(np.fft.rfft(IN["x"]))[k] * 2 / len(IN["x"])), float(X.max())]))',
      { x },
    ) as [number, number, number];
    expect(r[0]).toBe(1250);
    expect(r[1]).toBeCloseTo(10 ** (-6 / 20), 9);
    expect(r[2]).toBeLessThan(1e-9);
  });

  it('an impulse is one sample at 10^(L/20) after delaySamples', () => {
    const spec: ImpulseSpec = { kind: 'impulse', sampleRate: 8000, channels: 2, seconds: 0.01, levelDbfs: -6, delaySamples: 17 };
    const { channels, sampleRate } = generateStimulus(spec);
    expect(sampleRate).toBe(8000);
    expect(channels).toHaveLength(2);
    for (const ch of channels) {
      expect(ch.length).toBe(80);
      expect(ch[17]).toBeCloseTo(0.501187, 6); // 10^(−6/20)
      expect(ch.reduce((n, v) => n + (v !== 0 ? 1 : 0), 0)).toBe(1);
    }
  });

  it('silence is zeros on every channel', () => {
    const spec: SilenceSpec = { kind: 'silence', sampleRate: 44100, channels: 8, seconds: 0.05 };
    const { channels } = generateStimulus(spec);
    expect(channels).toHaveLength(8);
    for (const ch of channels) expect(ch.every((v) => v === 0)).toBe(true);
  });

  it('copies the signal to each channel as its own array', () => {
    const { channels } = generateStimulus(sineSpec({ channels: 4 }));
    expect(channels).toHaveLength(4);
    expect(Array.from(channels[3] ?? [])).toEqual(Array.from(channels[0] ?? []));
    expect(channels[3]).not.toBe(channels[0]);
  });

  it('fades a sine in and out with half-Hann ramps', () => {
    const x = generateStimulus(sineSpec({ fadeInSeconds: 0.01, fadeOutSeconds: 0.01 })).channels[0] ?? new Float64Array();
    expect(x[0]).toBe(0);
    expect(Math.abs(x[x.length - 1] ?? NaN)).toBe(0);
    expect(peak(x.subarray(0, 48))).toBeLessThan(0.1 * 0.03); // first 1 ms: gain ≤ ½(1 − cos(π/10)) ≈ 0.024
  });
});

describe('generateStimulus guards', () => {
  it('refuses levels above 0 dBFS', () => {
    const e = stimulusError(sineSpec({ levelDbfs: 0.5 }));
    expect(e.code).toBe('level-above-full-scale');
    expect(e.message).toMatch(/levelDbfs 0.5 is above 0 dBFS/);
  });

  it('refuses noise that would clip, and the suggested level then fits', () => {
    const e = stimulusError(whiteSpec({ levelDbfs: 0 }));
    expect(e.code).toBe('would-clip');
    const suggested = Number(/set levelDbfs to (-?[\d.]+)/.exec(e.message)?.[1]);
    // Gaussian peaks over 24000 samples reach about 4σ: 20·log10(4/√2) ≈ 9 dB above 0 dBFS RMS.
    expect(suggested).toBeLessThan(-6);
    expect(suggested).toBeGreaterThan(-14);
    const x = generateStimulus(whiteSpec({ levelDbfs: suggested })).channels[0] ?? new Float64Array();
    expect(peak(x)).toBeLessThanOrEqual(1);
  });

  it('refuses a random-phase multitone at 0 dBFS (crest factor above √2) but allows a 0 dBFS sine', () => {
    expect(stimulusError(multitoneSpec({ levelDbfs: 0, phases: 'random' })).code).toBe('would-clip');
    expect(peak(generateStimulus(sineSpec({ levelDbfs: 0 })).channels[0] ?? new Float64Array())).toBeLessThanOrEqual(1);
  });

  const invalid: Array<[string, StimulusSpec, StimulusErrorCode, RegExp]> = [
    ['frequency at Nyquist', sineSpec({ frequency: 24000 }), 'invalid-spec', /frequency must lie between 0 and fs\/2/],
    ['sample rate too low', sineSpec({ sampleRate: 4000, frequency: 100 }), 'invalid-spec', /sampleRate/],
    ['9 channels', sineSpec({ channels: 9 }), 'invalid-spec', /channels must be 1…8/],
    ['zero seconds', pinkSpec({ seconds: 0 }), 'invalid-spec', /seconds/],
    ['fades longer than the signal', sineSpec({ fadeInSeconds: 0.08, fadeOutSeconds: 0.05 }), 'invalid-spec', /fadeInSeconds/],
    ['negative seed', whiteSpec({ seed: -1 }), 'invalid-spec', /seed/],
    ['tone above Nyquist', multitoneSpec({ to: 30000 }), 'invalid-spec', /from\/to/],
    ['impulse outside the signal', { kind: 'impulse', sampleRate: 8000, channels: 1, seconds: 0.01, levelDbfs: -6, delaySamples: 80 }, 'invalid-spec', /delaySamples/],
  ];
  it.each(invalid)('names the field: %s', (_what, spec, code, message) => {
    const e = stimulusError(spec);
    expect(e.code).toBe(code);
    expect(e.message).toMatch(/^The stimulus's /);
    expect(e.message).toMatch(message);
  });
});
