import { describe, expect, it } from 'vitest';
import { aWeightingDb } from '../src/measures/a-weighting.js';
import { bandLevels, fractionalOctaveBands, octaveBandCenter } from '../src/measures/octave-bands.js';
import { createRealFftPlan } from '../src/fft/real-fft.js';
import { createWindow } from '../src/spectrum/windows.js';
import { sine } from './helpers/signals.js';
import { refusedBy } from './helpers/refused.js';

describe('fractional-octave bands (IEC 61260-1:2014)', () => {
  it('nominal 1/3-octave mid-band frequencies 25 Hz … 20 kHz', () => {
    // source: IEC 61260-1:2014 annex E, nominal mid-band frequencies (as listed in REFERENCES.md)
    const nominal = [25, 31.5, 40, 50, 63, 80, 100, 125, 160, 200, 250, 315, 400, 500, 630, 800, 1000, 1250, 1600, 2000, 2500, 3150, 4000, 5000, 6300, 8000, 10000, 12500, 16000, 20000];
    const bands = fractionalOctaveBands(3, 22, 22000);
    expect(bands.map((b) => b.nominalHz)).toEqual(nominal);
    // Exact centres f_r·G^(x/3) lie within 1.5 % of the rounded nominal values.
    for (const b of bands) expect(Math.abs(b.centerHz / b.nominalHz - 1)).toBeLessThan(0.015);
  });
  it('exact centres and edges from the base-10 formula', () => {
    const g = 10 ** 0.3; // IEC 61260-1 §5.2: G = 10^(3/10)
    // odd b: f_m = 1000·G^(x/b); even b: 1000·G^((2x+1)/(2b)); edges f_m·G^(±1/(2b))
    expect(octaveBandCenter(3, 0)).toBe(1000);
    expect(Math.abs(octaveBandCenter(3, 1) - 1000 * g ** (1 / 3))).toBeLessThan(1e-9);
    expect(Math.abs(octaveBandCenter(6, 0) - 1000 * g ** (1 / 12))).toBeLessThan(1e-9);
    expect(Math.abs(octaveBandCenter(12, -1) - 1000 * g ** (-1 / 24))).toBeLessThan(1e-9);
    const third = fractionalOctaveBands(3, 900, 1100)[0];
    // 1 kHz third-octave edges 891.25 and 1122.02 Hz (IEC 61260-1 table, from memory; formula exact)
    expect(Math.abs((third?.lowerHz ?? 0) - 891.2509)).toBeLessThan(1e-3);
    expect(Math.abs((third?.upperHz ?? 0) - 1122.0185)).toBeLessThan(1e-3);
    const octaves = fractionalOctaveBands(1, 30, 17000).map((b) => b.nominalHz);
    // source: IEC 61260-1 nominal octave mid-band frequencies
    expect(octaves).toEqual([31.5, 63, 125, 250, 500, 1000, 2000, 4000, 8000, 16000]);
    expect(() => fractionalOctaveBands(3, 0, 10)).toThrow(refusedBy('fractionalOctaveBands'));
  });
  it('a −20 dBFS tone reads −20 dBFS in its band from a Hann power spectrum', () => {
    const fs = 48000;
    const n = 65536;
    const x = sine(n, fs, 1000, 0.1);
    const w = createWindow('hann', n);
    const plan = createRealFftPlan(n);
    const re = new Float64Array(plan.bins);
    const im = new Float64Array(plan.bins);
    plan.forward(x.map((v, i) => v * (w[i] as number)), re, im);
    const s2 = w.reduce((s, v) => s + v * v, 0);
    const power = re.map((r, k) => ((k === 0 || k === plan.bins - 1 ? 1 : 2) * (r * r + (im[k] as number) ** 2)) / (n * s2));
    const levels = bandLevels(power, fs / n, fractionalOctaveBands(3, 20, 20000));
    const at1k = levels.find((l) => l.band.nominalHz === 1000);
    // source: definition of dBFS (AES17): amplitude 0.1 → −20 dBFS; Hann leakage outside the band
    // is below −100 dB at 100+ bins, so 0.01 dB is ample.
    expect(Math.abs((at1k?.levelDbfs ?? 0) + 20)).toBeLessThan(0.01);
    const at2k = levels.find((l) => l.band.nominalHz === 2000);
    expect(at2k?.levelDbfs).toBeLessThan(-120);
  });
});

describe('A-weighting (IEC 61672-1:2013)', () => {
  // source: IEC 61672-1:2013 table 3 (table from memory, rounded to 0.1 dB; the formula in annex E is
  // authoritative). The table is computed at the exact base-10 frequencies 1000·10^(x/10) behind
  // the nominal labels, so the check uses those; tolerance ±0.05 dB is the table's rounding.
  const table: [number, number, number][] = [[31.5, -15, -39.4], [63, -12, -26.2], [125, -9, -16.1], [250, -6, -8.6], [500, -3, -3.2], [1000, 0, 0], [2000, 3, 1.2], [4000, 6, 1.0], [8000, 9, -1.1], [16000, 12, -6.6]];
  for (const [nominal, x, db] of table) {
    it(`${nominal} Hz → ${db} dB`, () => {
      expect(Math.abs(aWeightingDb(1000 * 10 ** (x / 10)) - db)).toBeLessThanOrEqual(0.05 + 1e-9);
    });
  }
  it('is exactly 0 dB at 1 kHz and rejects negative frequencies', () => {
    expect(Math.abs(aWeightingDb(1000))).toBeLessThan(1e-12);
    expect(() => aWeightingDb(-1)).toThrow(refusedBy('aWeightingGain'));
  });
});
