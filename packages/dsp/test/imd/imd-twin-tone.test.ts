import { describe, expect, it } from 'vitest';
import { measureImdTwinTone } from '../../src/measures/imd-twin-tone.js';
import { generateStimulus } from '../../src/stimulus/generate-stimulus.js';
import { dither24, noiseShelf, plus, polynomial, tone, withLeadIn } from './imd-signals.js';
import { refusedBy } from '../helpers/refused.js';

// Twin tone at −6 dBFS combined peak: two tones of A = 10^(−6/20)/2 = 0.250594 each.
const A = 10 ** (-6 / 20) / 2;

function twin(fs: number, seconds: number, f1 = 18000, f2 = 19000): Float64Array {
  const n = Math.round(fs * seconds);
  return plus(tone(n, fs, f1, A), tone(n, fs, f2, A));
}

describe('measureImdTwinTone: closed forms', () => {
  it('y = x + a2·x² gives a2·A² at f2 − f1, so d2 = a2·A²/(2A) = a2·A/2', () => {
    // x² ⊃ 2A²·sin ω1t·sin ω2t = A²[cos(ω2−ω1)t − cos(ω2+ω1)t]: the difference tone has amplitude
    // a2·A²; the tones keep amplitude A (x² has no term at f1 or f2); d2 = a2·A²/(A + A) = a2·A/2
    // = 0.125297 % for a2 = 0.01 (closed form). At 48 kHz the x² lines at 2f1, 2f2, f1 + f2 alias
    // to 12, 10 and 11 kHz, away from every fitted frequency.
    const a2 = 0.01;
    const r = measureImdTwinTone(polynomial(twin(48000, 0.5), a2, 0), 48000);
    expect(r.lowHz).toBeCloseTo(18000, 4);
    expect(r.highHz).toBeCloseTo(19000, 4);
    expect(r.difference.frequencyHz).toBeCloseTo(1000, 4);
    expect(r.difference.amplitude).toBeCloseTo(a2 * A * A, 9);
    expect(Math.abs(r.d2Percent / ((100 * a2 * A) / 2) - 1)).toBeLessThan(0.01);
    expect(r.d2Db).toBeCloseTo(20 * Math.log10((a2 * A) / 2), 4);
    expect(r.d3Percent).toBeLessThan(1e-5); // x² makes no third-order products
  });

  it('y = x + 0.02·x³ gives (3/4)·a3·A³ at 2f1 − f2 and 2f2 − f1', () => {
    // x³ ⊃ 3A³·sin²ω1t·sin ω2t ⊃ −¾A³·sin(2ω1−ω2)t… (amplitude ¾·A³ each at 2f1 − f2, 2f2 − f1),
    // and each tone grows by a3·(¾A³ + 3/2·A³) = a3·(9/4)·A³. Hence
    // d3 = 2·(3/4)·a3·A³/(2A·(1 + (9/4)·a3·A²)) = (3/4)·a3·A²/(1 + (9/4)·a3·A²) = 0.093993 % (closed form).
    const a3 = 0.02;
    const r = measureImdTwinTone(polynomial(twin(48000, 0.5), 0, a3), 48000, { lowHz: 18000, highHz: 19000 });
    const grown = A * (1 + 2.25 * a3 * A * A);
    expect(r.lowAmplitude).toBeCloseTo(grown, 9);
    expect(r.thirdLower.frequencyHz).toBeCloseTo(17000, 4);
    expect(r.thirdUpper.frequencyHz).toBeCloseTo(20000, 4);
    expect(r.thirdLower.amplitude).toBeCloseTo(0.75 * a3 * A ** 3, 9);
    expect(r.thirdUpper.amplitude).toBeCloseTo(0.75 * a3 * A ** 3, 9);
    const expected = (100 * 0.75 * a3 * A * A) / (1 + 2.25 * a3 * A * A);
    expect(Math.abs(r.d3Percent / expected - 1)).toBeLessThan(0.01);
    expect(r.d2Percent).toBeLessThan(1e-5);
  });

  it('reports 2f2 − f1 as missing (null) when it is above fs/2', () => {
    // 44.1 kHz with tones at 20.5 and 21.5 kHz: 2f2 − f1 = 22.5 kHz lies above fs/2 = 22.05 kHz
    // (the cubic's product there aliases to 21.6 kHz, which is not fitted).
    const r = measureImdTwinTone(polynomial(twin(44100, 0.25, 20500, 21500), 0, 0.02), 44100, { lowHz: 20500, highHz: 21500 });
    expect(r.thirdUpper.frequencyHz).toBeCloseTo(22500, 3);
    expect(r.thirdUpper.amplitude).toBeNull();
    expect(r.thirdLower.amplitude).toBeCloseTo(0.75 * 0.02 * A ** 3, 7); // as above; 2e-5 relative leakage from the unfitted alias at 21.6 kHz in a 0.25 s record
  });
});

describe('measureImdTwinTone: realistic captures', () => {
  it('96 kHz stimulus with fades, 24-bit dither, 0.25 s idle lead-in, 30 kHz pilot and a noise shelf', () => {
    const fs = 96000;
    const stim = generateStimulus({ kind: 'imd-twin-tone', sampleRate: fs, channels: 1, seconds: 1, levelDbfs: -6, lowFrequency: 18000, highFrequency: 19000, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 }).channels[0] ?? new Float64Array();
    const a2 = 0.01;
    const a3 = 0.02;
    const body = withLeadIn(polynomial(stim, a2, a3), Math.round(0.25 * fs));
    const capture = dither24(plus(plus(body, tone(body.length, fs, 30000, 0.01)), noiseShelf(body.length, fs, 25000, 45000, -60, 4)), 9);
    const r = measureImdTwinTone(capture, fs);
    // With both terms: the difference tone is a2·A² (the cubic adds nothing at f2 − f1), the tones
    // are A·(1 + (9/4)·a3·A²) (the quadratic adds nothing at f1, f2), so
    // d2 = a2·A²/(2A·(1 + (9/4)·a3·A²)) (closed form, from the two derivations above).
    const d2 = (100 * a2 * A) / 2 / (1 + 2.25 * a3 * A * A);
    expect(Math.abs(r.d2Percent / d2 - 1)).toBeLessThan(0.01);
    const d3 = (100 * 0.75 * a3 * A * A) / (1 + 2.25 * a3 * A * A);
    expect(Math.abs(r.d3Percent / d3 - 1)).toBeLessThan(0.01);
    expect(r.range[0]).toBeGreaterThanOrEqual(0.26 * fs);
  });

  it('rejects a range outside the record', () => {
    expect(() => measureImdTwinTone(twin(48000, 0.1), 48000, { range: [0, 10 ** 6] })).toThrow(refusedBy('measureImdTwinTone', /^range/));
  });
});
