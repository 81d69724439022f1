import { describe, expect, it } from 'vitest';
import { measureToneDistortion } from '../../src/measures/tone-distortion.js';
import type { AudioBandPlan } from '../../src/measures/audio-band.js';
import { generateStimulus } from '../../src/stimulus/generate-stimulus.js';
import { gaussian } from '../helpers/signals.js';
import { addInto, bandNoise, cubic, dbfs, delayed, roundQuantise, tone, tpdfQuantise } from './capture-signals.js';
import { refusedBy } from '../helpers/refused.js';

const db = (p: number): number => 10 * Math.log10(p);
/** Main-lobe half-width of the band window, √(20² + π²)·fs/(π(N−1)) (Kaiser & Schafer 1980). */
const halfWidth = (fs: number, n: number): number => (Math.sqrt(400 + Math.PI ** 2) * fs) / (Math.PI * (n - 1));
/**
 * In-band mean square of white noise of total mean square σ²: the summed band is
 * 20 Hz − h … min(20 kHz + h, fs/2), so σ²·(min(20000 + h, fs/2) − 20 + h)/(fs/2).
 */
const inBand = (sigma2: number, fs: number, n: number): number => (sigma2 * (Math.min(20000 + halfWidth(fs, n), fs / 2) - 20 + halfWidth(fs, n))) / (fs / 2);
/** TPDF-dithered quantisation error has variance Δ²/4, Δ = 2^(1−bits) (Lipshitz et al., JAES 40(5), 1992). */
const tpdfPower = (bits: number): number => 2 ** (2 * (1 - bits)) / 4;
/** Rounding error of a busy signal has variance Δ²/12 (W. Kester, Analog Devices MT-001). */
const roundPower = (bits: number): number => 2 ** (2 * (1 - bits)) / 12;
const P1 = dbfs(-1) ** 2 / 2; // a −1 dBFS sine's mean square

/** The stimulus generator's 2 s, −1 dBFS, 997 Hz, 48 kHz sine with 0.05 s fades. */
function fadedSine(): Float64Array {
  return generateStimulus({ kind: 'sine', sampleRate: 48000, channels: 1, seconds: 2, levelDbfs: -1, frequency: 997, fadeInSeconds: 0.05, fadeOutSeconds: 0.05 }).channels[0] as Float64Array;
}

describe('in-band noise with ultrasonic content (failures of distortion.ts inBandPower)', () => {
  it('96 kHz, −1 dBFS 997 Hz, 24-bit TPDF, 30 kHz pilot at −40 dBFS: SNR from the dither alone', () => {
    const fs = 96000;
    const n = 96000;
    const x = tpdfQuantise(addInto(tone(n, fs, 997, dbfs(-1)), tone(n, fs, 30000, dbfs(-40), 1.1)), 24, 1);
    // Before engine 1.0 the whole-record rectangular sum (measureDistortion) read SNR 89.5 dB here
    // (reproduced 2026-12-02), the pilot leaking into the band.
    const r = measureToneDistortion(x, fs);
    // SNR = P1/(Δ²/4 · in-band fraction) = 144.29 dB (closed form above). Estimate spread ±0.05 dB.
    expect(Math.abs((r.tone?.snrDb ?? 0) - db(P1 / inBand(tpdfPower(24), fs, n)))).toBeLessThan(0.2);
    expect(r.warnings).toEqual([]);
  });

  it('96 kHz with a −60 dBFS noise shelf at 25–45 kHz: noise floor of the in-band dither alone', () => {
    const fs = 96000;
    const n = 96000;
    const x = tpdfQuantise(addInto(tone(n, fs, 997, dbfs(-1)), bandNoise(n, fs, 25000, 45000, dbfs(-60) ** 2 / 2, 5)), 24, 2);
    // Before engine 1.0 the rectangular sum (measureDistortion) read a noise floor of −116.7 dBFS here.
    // Floor = 10·log10(2·Δ²/4·fraction) = −145.29 dBFS (closed form above).
    expect(Math.abs((measureToneDistortion(x, fs).noiseFloorDbfs ?? 0) - db(2 * inBand(tpdfPower(24), fs, n)))).toBeLessThan(0.2);
  });
});

describe('A weighting on the noise only (AES17)', () => {
  it('100 Hz, −1 dBFS, 16-bit TPDF at 48 kHz: SNR_A = P1/(σ²·0.51947)', () => {
    const fs = 48000;
    const x = tpdfQuantise(tone(fs, fs, 100, dbfs(-1)), 16, 3);
    const r = measureToneDistortion(x, fs);
    // A-weighted fraction of white noise in 20 Hz…20 kHz at 48 kHz, numpy (see audio-band.test.ts):
    // 0.5194659862291258 → SNR_A = 10·log10(P1/(2^-32·0.51947)) = 95.08 dB. Weighting the 100 Hz
    // fundamental too (old mask check) would read 19.1 dB less (IEC 61672-1 table 3).
    expect(Math.abs((r.tone?.snrDbA ?? 0) - db(P1 / (tpdfPower(16) * 0.5194659862291258)))).toBeLessThan(0.15);
    expect(Math.abs((r.tone?.snrDb ?? 0) - db(P1 / inBand(tpdfPower(16), fs, fs)))).toBeLessThan(0.15);
  });
});

describe('band edges, out-of-band fundamentals and THD without harmonics', () => {
  it('a tone at exactly 20 Hz (48 kHz) reads the same THD+N whatever the fit\'s last bit', () => {
    const fs = 48000;
    // Rounded to 24 bits: THD+N = −(6.02·24 + 1.76) + 1 − 10·log10(24000/19980) = −146.06 dB
    // (MT-001 with the band's processing gain). Before engine 1.0 measureDistortion read THD+N 0 dB
    // for 20·(1 − 1e-9) Hz here (the fitted fundamental fell outside the band).
    const expected = db(inBand(roundPower(24), fs, fs) / P1);
    for (const eps of [-1e-9, 0, 1e-9]) {
      const r = measureToneDistortion(roundQuantise(tone(fs, fs, 20 * (1 + eps), dbfs(-1)), 24), fs);
      expect(Math.abs((r.tone?.thdnDb ?? 0) - expected)).toBeLessThan(0.4);
    }
  });

  it('a tone at exactly 20 kHz (44.1 kHz) is in band; THD is null (no harmonic below Nyquist)', () => {
    const fs = 44100;
    const expected = db(inBand(roundPower(24), fs, fs) / P1); // −145.69 dB, as above with 22050/19980
    // Before engine 1.0 measureDistortion read THD+N 0 dB for exactly 20 kHz here: the fitted
    // 20000.00000000003 Hz fell outside the band.
    for (const eps of [-1e-9, 0, 1e-9]) {
      const r = measureToneDistortion(roundQuantise(tone(fs, fs, 20000 * (1 + eps), dbfs(-1)), 24), fs);
      // 0.3 dB: a tone at 400/441 of fs repeats every 441 samples, so its rounding error is not white.
      expect(Math.abs((r.tone?.thdnDb ?? 0) - expected)).toBeLessThan(0.3);
      expect(r.tone?.thdPercent).toBeNull();
      expect(r.warnings.join(' ')).toMatch(/THD is not reported/);
    }
  });

  it('a fundamental outside the band gives no tone measures and says so (old path: THD+N 0 dB)', () => {
    const fs = 96000;
    const x = roundQuantise(tone(fs, fs, 25000, dbfs(-1)), 24);
    // Before engine 1.0 measureDistortion read THD+N 0 dB here instead of refusing.
    const r = measureToneDistortion(x, fs);
    expect(r.tone).toBeNull();
    expect(r.warnings.join(' ')).toMatch(/25000\.00 Hz lies outside the measurement band/);
    // The noise floor is still measured: 10·log10(2·Δ²/12·fraction) = −150.1 dBFS (24-bit rounding
    // in band, closed form above); 0.5 dB as a tone at fs/3.84 rounds with a slightly coloured error.
    expect(Math.abs((r.noiseFloorDbfs ?? 0) - db(2 * inBand(roundPower(24), fs, fs)))).toBeLessThan(0.5);
  });
});

describe('steady window in the chain', () => {
  it('fades: generator sine with 0.05 s fades, 24-bit rounded, reads ≈ −146 dB THD+N', () => {
    const stim = fadedSine();
    const x = roundQuantise(stim, 24);
    // Before engine 1.0 steadyStateRange + measureDistortion read THD+N −27.1 dB here: the
    // 1 %-of-peak threshold kept most of both fades.
    // −(6.02·24 + 1.76) + 1 − 10·log10(24000/19980) = −146.06 dB (MT-001, band gain).
    const expected = db(inBand(roundPower(24), 48000, 90000) / P1);
    const withStimulus = measureToneDistortion(x, 48000, { stimulusWindow: { stimulus: stim, latencySamples: 0 } });
    const alone = measureToneDistortion(x, 48000);
    for (const r of [withStimulus, alone]) {
      expect(Math.abs((r.tone?.thdnDb ?? 0) - expected)).toBeLessThan(0.3);
      expect(r.window.trimmedLeadIn && r.window.trimmedTail).toBe(true);
    }
  });

  it('latency gap of 16-bit dithered idle noise before a −60 dBFS tone: AES17 dynamic range 96.16 dB', () => {
    const fs = 48000;
    const x = tpdfQuantise(delayed(tone(fs, fs, 997, dbfs(-60)), 4800), 16, 9);
    // DR = −10·log10(2·σ²·0.51947), σ² = 2^-32 (TPDF 16 bit) → 96.164 dB; numpy:
    // -10*np.log10(2*2**-32*0.5194659862291258). Before engine 1.0 steadyStateRange +
    // measureDistortion read THD+N −10.4 dB over the whole record here (the gap counted as
    // distortion), DR 70.4 dB.
    const r = measureToneDistortion(x, fs);
    expect(Math.abs((r.dynamicRangeDb ?? 0) - 96.1637274964135)).toBeLessThan(0.15);
    expect(r.window.start).toBeGreaterThanOrEqual(4800);
  });

  it('a 30 kHz pilot at −40 dBFS no longer hides a 63-sample latency gap (96 kHz, y = x + 0.02·x³)', () => {
    const fs = 96000;
    const n = 96000;
    const x = delayed(cubic(tone(n, fs, 997, dbfs(-1)), 0.02), 63);
    addInto(x, tone(n + 63, fs, 30000, dbfs(-40), 0.2));
    const q = tpdfQuantise(x, 24, 11);
    // x + c·x³ with x = A·sin: A1 = A + 3cA³/4, A3 = cA³/4 (sin³ = (3 sin − sin 3θ)/4), so
    // THD = 100·A3/A1 = 0.39249 % and THD+N ≈ 20·log10(A3/√(A1² + A3²)) = −48.12 dB (noise −144 dB adds nothing).
    const a = dbfs(-1);
    const a1 = a + (3 * 0.02 * a ** 3) / 4;
    const a3 = (0.02 * a ** 3) / 4;
    // Before engine 1.0 steadyStateRange returned start 0 here (the gap was not seen) and
    // measureDistortion read THD+N above −40 dB over that range.
    const r = measureToneDistortion(q, fs);
    expect(r.window.start).toBeGreaterThanOrEqual(63);
    expect(Math.abs((r.tone?.thdPercent ?? 0) / ((100 * a3) / a1) - 1)).toBeLessThan(1e-4);
    expect(Math.abs((r.tone?.thdnDb ?? 0) - 20 * Math.log10(a3 / Math.hypot(a1, a3)))).toBeLessThan(0.01);
  });
});

describe('sample rates, lengths and degenerate records', () => {
  for (const [fs, seconds] of [
    [44100, 1],
    [96000, 0.1],
    [192000, 1],
    [48000, 0.1],
  ] as const) {
    it(`${fs} Hz, ${seconds} s, −1 dBFS 997 Hz with 24-bit TPDF: SNR from Δ²/4 in band`, () => {
      const n = Math.round(fs * seconds);
      const r = measureToneDistortion(tpdfQuantise(tone(n, fs, 997, dbfs(-1)), 24, 7), fs);
      // Closed form as above: 140.91 dB at 44.1 kHz, 147.30 dB at 192 kHz, … Short records
      // estimate the noise from fewer bins: ±0.15 dB spread at 0.1 s, so 0.5 dB is allowed.
      const tol = seconds < 1 ? 0.5 : 0.2;
      expect(Math.abs((r.tone?.snrDb ?? 0) - db(P1 / inBand(tpdfPower(24), fs, n)))).toBeLessThan(tol);
      expect(r.window).toMatchObject({ start: 0, end: n });
    });
  }

  it('24-bit capture with −140 dBFS white noise: floor = noise + dither, in band', () => {
    const fs = 48000;
    const noise = gaussian(fs, 5, Math.sqrt(dbfs(-140) ** 2 / 2));
    const x = tpdfQuantise(addInto(tone(fs, fs, 997, dbfs(-1)), noise), 24, 8);
    const sigma2 = dbfs(-140) ** 2 / 2 + tpdfPower(24); // independent powers add
    const r = measureToneDistortion(x, fs);
    expect(Math.abs((r.noiseFloorDbfs ?? 0) - db(2 * inBand(sigma2, fs, fs)))).toBeLessThan(0.15);
  });

  it('silence: everything null, no throw', () => {
    const r = measureToneDistortion(new Float64Array(4800), 48000);
    expect(r.tone).toBeNull();
    expect(r.noiseFloorDbfs).toBeNull();
    expect(r.dynamicRangeDb).toBeNull();
    expect(r.warnings.length).toBeGreaterThan(0);
  });

  it('DC only: no tone, the DC reported, no noise', () => {
    const r = measureToneDistortion(new Float64Array(4800).fill(0.25), 48000);
    expect(r.tone).toBeNull();
    expect(r.dc).toBe(0.25);
    expect(r.noiseFloorDbfs).toBeNull();
  });

  it('white noise alone: no tone (SINAD < 0 dB), floor of the noise in band', () => {
    const x = gaussian(48000, 9, 0.01);
    const r = measureToneDistortion(x, 48000);
    expect(r.tone).toBeNull();
    expect(Math.abs((r.noiseFloorDbfs ?? 0) - db(2 * inBand(1e-4, 48000, 48000)))).toBeLessThan(0.2);
  });

  it('reuses band plans across channels through a caller-owned cache', () => {
    const plans = new Map<string, AudioBandPlan>();
    const x = tpdfQuantise(tone(9600, 48000, 997, dbfs(-1)), 24, 1);
    const a = measureToneDistortion(x, 48000, { bandPlans: plans });
    const b = measureToneDistortion(x, 48000, { bandPlans: plans });
    expect(plans.size).toBe(1);
    expect(b.tone?.snrDb).toBe(a.tone?.snrDb);
  });

  it('rejects bad input with the function name', () => {
    expect(() => measureToneDistortion(new Float64Array(10), 48000)).toThrow(refusedBy('measureToneDistortion'));
    expect(() => measureToneDistortion(new Float64Array(100), 48000, { window: [50, 20] })).toThrow(refusedBy('measureToneDistortion'));
  });
});
