import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createRealFftPlan } from '../src/fft/real-fft.js';
import { measureLevels, spectralEnergy } from '../src/measures/levels.js';
import { gaussian, sine } from './helpers/signals.js';
import { refusedBy } from './helpers/refused.js';

describe('levels (AES17: full-scale sine = 0 dBFS)', () => {
  it('reads a full-scale sine as 0 dBFS RMS and peak, crest factor 3.0103 dB', () => {
    // 48 whole cycles of 1 kHz at 48 kHz: RMS is exactly 1/√2 up to rounding.
    const x = sine(48 * 48, 48000, 1000, 1, 0.3);
    const l = measureLevels(x);
    // source: AES17 definition (0 dBFS RMS for a full-scale sine); crest factor of a sine √2 = 3.0103 dB
    expect(Math.abs(l.rmsDbfs)).toBeLessThan(1e-9);
    expect(Math.abs(l.peakDbfs)).toBeLessThan(0.01); // sampled peak within 1 − cos(π/48·…) of 1
    expect(Math.abs(l.crestFactorDb - 20 * Math.log10(Math.SQRT2))).toBeLessThan(0.01);
  });
  it('reads a −20 dBFS sine as −20 dB, half amplitude as −6.0206 dB', () => {
    const a = measureLevels(sine(4800, 48000, 1000, 0.1));
    const b = measureLevels(sine(4800, 48000, 1000, 0.05));
    // source: definition of dB: 20·log10(0.1) = −20, 20·log10(1/2) = −6.0206
    expect(Math.abs(a.rmsDbfs + 20)).toBeLessThan(1e-9);
    expect(Math.abs(b.rmsDbfs - a.rmsDbfs + 6.0206)).toBeLessThan(1e-4);
  });
  it('reads the DC offset, also of a clipped sine (clipping itself: integrity/clipping.test.ts)', () => {
    // 100 whole cycles of 1 kHz at 48 kHz: the sine averages to 0, so the mean is the DC (definition).
    expect(Math.abs(measureLevels(sine(4800, 48000, 1000, 0.5, 0, 0.01)).dcOffset - 0.01)).toBeLessThan(1e-12);
    const x = sine(4800, 48000, 1000, 1.2, 0, 0.01);
    for (let i = 0; i < x.length; i++) x[i] = Math.max(-1, Math.min(1, x[i] as number));
    const l = measureLevels(x);
    expect(Math.abs(l.dcOffset - 0.01)).toBeLessThan(0.01); // clipping skews the mean slightly
    expect(() => measureLevels(new Float64Array(0))).toThrow(refusedBy('measureLevels'));
  });
});

describe('energy in both domains (Parseval)', () => {
  it('agrees to 1e-9 relative on random inputs of random length (zero padded)', () => {
    // source: Parseval's relation, Σ|x|² = (1/N)·Σ|X|², Oppenheim & Schafer §8.6; REFERENCES.md asks 1e-9
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5000 }), fc.integer({ min: 1, max: 1e6 }), (length, seed) => {
        const x = gaussian(length, seed);
        let n = 2;
        while (n < length) n *= 2;
        const plan = createRealFftPlan(n);
        const buf = new Float64Array(n);
        buf.set(x);
        const re = new Float64Array(plan.bins);
        const im = new Float64Array(plan.bins);
        plan.forward(buf, re, im);
        const et = measureLevels(x).energy;
        expect(Math.abs(spectralEnergy(re, im, n) - et) / et).toBeLessThan(1e-9);
      }),
      { numRuns: 40 },
    );
  });
});
