import { describe, expect, it } from 'vitest';
import { ImdSmpteSpec, ImdTwinToneSpec, StimulusSpec, type ImdSmpteSpec as ImdSmpte, type ImdTwinToneSpec as ImdTwin } from '@earmark/contracts';
import { fitSinusoids } from '../../src/measures/imd-tone-fit.js';
import { StimulusError, generateStimulus, twoToneAmplitudes } from '../../src/stimulus/index.js';
import { peak } from './spec-fixtures.js';
import { refusedBy } from '../helpers/refused.js';

function smpte(p: Partial<ImdSmpte> = {}): ImdSmpte {
  return { kind: 'imd-smpte', sampleRate: 48000, channels: 1, seconds: 1, levelDbfs: -20, lowFrequency: 60, highFrequency: 7000, ratio: 4, fadeInSeconds: 0, fadeOutSeconds: 0, ...p };
}

function twin(p: Partial<ImdTwin> = {}): ImdTwin {
  return { kind: 'imd-twin-tone', sampleRate: 48000, channels: 1, seconds: 1, levelDbfs: -20, lowFrequency: 18000, highFrequency: 19000, fadeInSeconds: 0, fadeOutSeconds: 0, ...p };
}

function codeOf(spec: StimulusSpec): string {
  try {
    generateStimulus(spec);
  } catch (e) {
    if (e instanceof StimulusError) return `${e.code}: ${e.message}`;
    throw e;
  }
  return 'accepted';
}

describe('imd-smpte stimulus (SMPTE RP120 / IEC 60268-3: 60 Hz + 7 kHz at 4:1)', () => {
  it('the schema fills the SMPTE defaults', () => {
    const s = StimulusSpec.parse({ kind: 'imd-smpte', sampleRate: 48000, seconds: 1 });
    expect(s).toMatchObject({ kind: 'imd-smpte', lowFrequency: 60, highFrequency: 7000, ratio: 4, levelDbfs: -20, channels: 1, fadeInSeconds: 0 });
  });

  it('has tones of 0.8·P and 0.2·P with P = 10^(L/20), peaking just under P', () => {
    const x = generateStimulus(smpte()).channels[0] ?? new Float64Array();
    expect(x.length).toBe(48000);
    const fit = fitSinusoids(x, 48000, [60, 7000]);
    // P = 10^(−20/20) = 0.1; 4:1 → A1 = 0.08, A2 = 0.02 (closed form A1 = P·r/(r+1), A2 = P/(r+1)).
    expect(fit.components[0]?.amplitude).toBeCloseTo(0.08, 12);
    expect(fit.components[1]?.amplitude).toBeCloseTo(0.02, 12);
    // numpy: n=np.arange(48000); np.abs(0.08*np.sin(2*np.pi*60*n/48000)+0.02*np.sin(2*np.pi*7000*n/48000)).max()
    expect(peak(x)).toBeCloseTo(0.09996052482925873, 12);
  });

  it('follows DIN 45403 frequencies and other ratios; copies to every channel; applies fades', () => {
    const { channels } = generateStimulus(smpte({ lowFrequency: 250, highFrequency: 8000, ratio: 1, channels: 3, levelDbfs: -6, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 }));
    expect(channels).toHaveLength(3);
    expect(Array.from(channels[2] ?? [])).toEqual(Array.from(channels[0] ?? []));
    const x = channels[0] ?? new Float64Array();
    expect(x[0]).toBe(0); // raised-cosine fade starts at gain 0
    const fit = fitSinusoids(x.subarray(480, 48000 - 480), 48000, [250, 8000]);
    // ratio 1: both tones P/2 = 10^(−6/20)/2 = 0.250594 (closed form)
    expect(fit.components[0]?.amplitude).toBeCloseTo(10 ** (-6 / 20) / 2, 9);
    expect(fit.components[1]?.amplitude).toBeCloseTo(10 ** (-6 / 20) / 2, 9);
  });

  it('never clips at 0 dBFS: the combined peak is at most full scale', () => {
    expect(peak(generateStimulus(smpte({ levelDbfs: 0, seconds: 2 })).channels[0] ?? new Float64Array())).toBeLessThanOrEqual(1);
  });

  it('refuses tones out of order or above fs/2, naming the field (engine and schema)', () => {
    expect(codeOf(smpte({ lowFrequency: 8000, highFrequency: 7000 }))).toMatch(/^invalid-spec: The stimulus's lowFrequency must be below highFrequency/);
    expect(codeOf(smpte({ highFrequency: 24000 }))).toMatch(/^invalid-spec: The stimulus's lowFrequency\/highFrequency must lie between 0 and fs\/2/);
    expect(codeOf(smpte({ ratio: 0 }))).toMatch(/^invalid-spec: The stimulus's ratio/);
    const bad = ImdSmpteSpec.safeParse({ kind: 'imd-smpte', sampleRate: 16000, seconds: 1, highFrequency: 8000 });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.path).toEqual(['highFrequency']);
    expect(ImdSmpteSpec.safeParse({ kind: 'imd-smpte', sampleRate: 48000, seconds: 1, ratio: 1000 }).error?.issues[0]?.path).toEqual(['ratio']);
  });
});

describe('imd-twin-tone stimulus (IEC 60268-3 difference-frequency distortion: 18 + 19 kHz)', () => {
  it('the schema fills 18 kHz and 19 kHz', () => {
    const s = ImdTwinToneSpec.parse({ kind: 'imd-twin-tone', sampleRate: 44100, seconds: 0.5 });
    expect(s).toMatchObject({ lowFrequency: 18000, highFrequency: 19000, levelDbfs: -20 });
    expect(ImdTwinToneSpec.safeParse({ kind: 'imd-twin-tone', sampleRate: 32000, seconds: 0.5 }).success).toBe(false); // 19 kHz > 16 kHz
  });

  it('has two equal tones of P/2 whose peak stays below P', () => {
    const x = generateStimulus(twin()).channels[0] ?? new Float64Array();
    const fit = fitSinusoids(x, 48000, [18000, 19000]);
    expect(fit.components[0]?.amplitude).toBeCloseTo(0.05, 12); // P/2 = 0.1/2
    expect(fit.components[1]?.amplitude).toBeCloseTo(0.05, 12);
    // numpy: n=np.arange(48000); np.abs(0.05*np.sin(2*np.pi*18000*n/48000)+0.05*np.sin(2*np.pi*19000*n/48000)).max()
    expect(peak(x)).toBeCloseTo(0.0982962913147624, 12);
  });

  it('is deterministic', () => {
    const a = generateStimulus(twin({ seconds: 0.1 })).channels[0] ?? new Float64Array();
    const b = generateStimulus(twin({ seconds: 0.1 })).channels[0] ?? new Float64Array();
    expect(Array.from(a)).toEqual(Array.from(b));
  });
});

describe('twoToneAmplitudes', () => {
  it('splits the peak r:1 and checks its arguments', () => {
    expect(twoToneAmplitudes(1, 4)).toEqual({ low: 0.8, high: 0.2 });
    expect(() => twoToneAmplitudes(1, 0)).toThrow(refusedBy('twoToneAmplitudes', /^ratio/));
    expect(() => twoToneAmplitudes(-1, 4)).toThrow(refusedBy('twoToneAmplitudes', /^peak/));
  });
});
