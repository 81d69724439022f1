import { describe, expect, it } from 'vitest';
import { measureImdSmpte } from '../../src/measures/imd-smpte.js';
import { generateStimulus } from '../../src/stimulus/generate-stimulus.js';
import { dither24, noiseShelf, plus, polynomial, tone, withLeadIn } from './imd-signals.js';
import { refusedBy } from '../helpers/refused.js';

// SMPTE RP120 / IEC 60268-3 signal: f1 = 60 Hz, f2 = 7 kHz, amplitudes 4:1, combined peak P.
// At −6 dBFS: P = 10^(−6/20) = 0.501187, A1 = 0.8·P = 0.400950, A2 = 0.2·P = 0.100237.
const P = 10 ** (-6 / 20);
const A1 = 0.8 * P;
const A2 = 0.2 * P;

function smptePair(fs: number, seconds: number, f1 = 60, f2 = 7000, a1 = A1, a2 = A2): Float64Array {
  const n = Math.round(fs * seconds);
  return plus(tone(n, fs, f1, a1), tone(n, fs, f2, a2));
}

describe('measureImdSmpte: closed forms', () => {
  it('y = x + a2·x² gives sidebands a2·A1·A2 at f2 ± f1, so IMD = 100·√2·a2·A1 %', () => {
    // x = A1·sin ω1t + A2·sin ω2t; x² ⊃ 2A1A2·sin ω1t·sin ω2t = A1A2[cos(ω2−ω1)t − cos(ω2+ω1)t]:
    // each sideband has amplitude a2·A1·A2 and the f2 line stays A2 (x² has no term at f2), so
    // IMD = 100·√(2·(a2A1A2)²)/A2 = 100·√2·a2·A1 = 0.567034 % for a2 = 0.01 (closed form).
    const a2 = 0.01;
    const r = measureImdSmpte(polynomial(smptePair(48000, 1), a2, 0), 48000);
    const expected = 100 * Math.SQRT2 * a2 * A1;
    expect(r.lowHz).toBeCloseTo(60, 6);
    expect(r.highHz).toBeCloseTo(7000, 6);
    expect(r.imdPercent / expected - 1).toBeLessThan(0.01);
    expect(Math.abs(r.imdPercent / expected - 1)).toBeLessThan(1e-6); // exact model, exact fit
    expect(r.sidebands[0]?.lowerAmplitude).toBeCloseTo(a2 * A1 * A2, 9);
    expect(r.sidebands[0]?.upperAmplitude).toBeCloseTo(a2 * A1 * A2, 9);
    // Per-order arithmetic sum (A₋ + A₊)/A2 = 2·a2·A1 (same derivation).
    expect(r.sidebands[0]?.percent).toBeCloseTo(100 * 2 * a2 * A1, 6);
    expect(r.sidebands[1]?.lowerAmplitude).toBeLessThan(1e-8); // x² has no f2 ± 2f1 term (what remains is leakage of unmodelled lines, < −150 dB)
    expect(r.imdDb).toBeCloseTo(20 * Math.log10(expected / 100), 5);
  });

  it('y = x + 0.02·x³ gives the second-order pair (3/4)·a3·A1²·A2 at f2 ± 2f1', () => {
    // x³ ⊃ 3·A1²A2·sin²ω1t·sin ω2t = 3A1²A2·[½ sin ω2t − ¼ sin(ω2+2ω1)t − ¼ sin(ω2−2ω1)t], and
    // A2³ sin³ω2t = A2³(¾ sin ω2t − ¼ sin 3ω2t): the pair at f2 ± 2f1 is (3/4)·a3·A1²·A2 each and
    // the f2 line grows to A2·(1 + a3·(3/2·A1² + 3/4·A2²)), so
    // IMD = 100·√2·(3/4)·a3·A1²/(1 + a3·(1.5·A1² + 0.75·A2²)) = 0.339394 % (closed form).
    const a3 = 0.02;
    const r = measureImdSmpte(polynomial(smptePair(48000, 1), 0, a3), 48000, { lowHz: 60, highHz: 7000 });
    const expected = (100 * Math.SQRT2 * 0.75 * a3 * A1 ** 2) / (1 + a3 * (1.5 * A1 ** 2 + 0.75 * A2 ** 2));
    expect(Math.abs(r.imdPercent / expected - 1)).toBeLessThan(0.01);
    expect(r.highAmplitude).toBeCloseTo(A2 * (1 + a3 * (1.5 * A1 ** 2 + 0.75 * A2 ** 2)), 9);
    expect(r.sidebands[1]?.lowerAmplitude).toBeCloseTo(0.75 * a3 * A1 ** 2 * A2, 9);
    expect(r.sidebands[0]?.upperAmplitude).toBeLessThan(1e-8); // x³ has no f2 ± f1 term
  });

  it('a linear path reads no IMD; only orders inside (0, fs/2) are reported', () => {
    const r = measureImdSmpte(smptePair(48000, 0.5), 48000, { orders: 3 });
    expect(r.imdPercent).toBeLessThan(1e-8);
    expect(r.sidebands.map((s) => s.order)).toEqual([1, 2, 3]);
    expect(r.lowAmplitude).toBeCloseTo(A1, 9);
    expect(r.highAmplitude).toBeCloseTo(A2, 9);
  });

  it('DIN 45403 pair, 250 Hz + 8 kHz at 4:1, found without hints at 44.1 kHz', () => {
    // Same closed form as above with f1 = 250 Hz: IMD = 100·√2·a2·A1 = 1.134068 % for a2 = 0.02.
    const a2 = 0.02;
    const r = measureImdSmpte(polynomial(smptePair(44100, 0.5, 250, 8000), a2, 0), 44100);
    expect(r.lowHz).toBeCloseTo(250, 4);
    expect(r.highHz).toBeCloseTo(8000, 4);
    expect(Math.abs(r.imdPercent / (100 * Math.SQRT2 * a2 * A1) - 1)).toBeLessThan(0.01);
  });
});

describe('measureImdSmpte: realistic captures', () => {
  it('96 kHz, 24-bit dither, 0.3 s idle lead-in, fades, 30 kHz pilot and a 25–45 kHz noise shelf', () => {
    const fs = 96000;
    const stim = generateStimulus({ kind: 'imd-smpte', sampleRate: fs, channels: 1, seconds: 1.5, levelDbfs: -6, lowFrequency: 60, highFrequency: 7000, ratio: 4, fadeInSeconds: 0.02, fadeOutSeconds: 0.02 }).channels[0] ?? new Float64Array();
    const a3 = 0.02;
    const body = withLeadIn(polynomial(stim, 0, a3), Math.round(0.3 * fs), Math.round(0.1 * fs));
    const pilot = tone(body.length, fs, 30000, 10 ** (-40 / 20));
    const shelf = noiseShelf(body.length, fs, 25000, 45000, -60, 11);
    const capture = dither24(plus(plus(body, pilot), shelf), 3);
    const r = measureImdSmpte(capture, fs);
    // Closed form of the cubic case (previous describe): 0.339394 %.
    const expected = (100 * Math.SQRT2 * 0.75 * a3 * A1 ** 2) / (1 + a3 * (1.5 * A1 ** 2 + 0.75 * A2 ** 2));
    expect(Math.abs(r.imdPercent / expected - 1)).toBeLessThan(0.01);
    // The analysed range starts after the lead-in and the 20 ms fade-in, ends before the fade-out.
    expect(r.range[0]).toBeGreaterThanOrEqual(0.32 * fs);
    expect(r.range[1]).toBeLessThanOrEqual(Math.round(1.78 * fs));
    expect(r.range[1] - r.range[0]).toBeGreaterThan(1.2 * fs);
  });

  it('tracks a capture clock 50 ppm fast (tones at 60.003 Hz and 7000.35 Hz)', () => {
    // A DUT clock 50 ppm off shifts both tones by 50 ppm; the sine fits follow them.
    const k = 1 + 50e-6;
    const a2 = 0.01;
    const x = dither24(polynomial(smptePair(48000, 1, 60 * k, 7000 * k), a2, 0), 5);
    const r = measureImdSmpte(x, 48000, { lowHz: 60, highHz: 7000 });
    expect(r.lowHz).toBeCloseTo(60 * k, 5);
    expect(r.highHz).toBeCloseTo(7000 * k, 4);
    expect(Math.abs(r.imdPercent / (100 * Math.SQRT2 * a2 * A1) - 1)).toBeLessThan(0.01);
  });

  it('rejects bad options with the function name', () => {
    const x = smptePair(48000, 0.2);
    expect(() => measureImdSmpte(x, 48000, { orders: 0 })).toThrow(refusedBy('measureImdSmpte', /^orders/));
    expect(() => measureImdSmpte(x, 48000, { lowHz: 7000, highHz: 60 })).toThrow(refusedBy('measureImdSmpte', /^need 0 < f1 < f2/));
    expect(() => measureImdSmpte(x, 48000, { range: [0, 100] })).toThrow(refusedBy('measureImdSmpte', /^range/));
  });
});
