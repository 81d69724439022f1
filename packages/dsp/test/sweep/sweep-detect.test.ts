import { describe, expect, it } from 'vitest';
import { detectExponentialSweep } from '../../src/transfer/sweep-detect.js';
import { gaussian, sine } from '../helpers/signals.js';
import { sweepReference, tpdfDither24 } from './sweep-signals.js';
import { refusedBy } from '../helpers/refused.js';

describe('detectExponentialSweep: an exponential sweep given only as samples', () => {
  for (const fs of [44100, 48000, 96000, 192000]) {
    it(`finds a 2 s 20 Hz–20 kHz sweep at ${fs} Hz with fades, dithered lead-in and trailing silence`, () => {
      // 0.25 s of silence, the sweep at −6 dBFS (A = 0.5) with 10 ms half-Hann fades, 0.5 s of silence;
      // 24-bit TPDF dither everywhere (≈ −145 dBFS RMS).
      const clean = sweepReference(fs, 20, 20000, 2, 0.5, { lead: 0.25, fade: 0.01 });
      const dither = tpdfDither24(clean.length, 5);
      const x = clean.map((v, i) => v + (dither[i] as number));
      const found = detectExponentialSweep(x, fs);
      expect(found).not.toBeNull();
      if (!found) return;
      // The generator's parameters (Farina 2000, eq. 2): f1 = 20 Hz at the first sample, f2 = 20 kHz
      // one past the last, T = 2 s. The fade-in hides the first samples below −60 dB of the peak:
      // the half-Hann gain ½(1 − cos(πn/F)) times sin(2π·20·n/fs) reaches 1e−3 after ≈ (2·1e−3·F²·fs/(π³·20))^(1/3)
      // samples (closed form of the product's leading term), ≤ 1.3 ms, so f1 reads at most
      // e^{1.3 ms·ln(1000)/2 s} − 1 = 0.45 % high; the fit of ln f itself is good to 0.1 %.
      expect(found.f1 / 20 - 1).toBeGreaterThanOrEqual(-0.001);
      expect(found.f1 / 20 - 1).toBeLessThan(0.006);
      expect(Math.abs(found.f2 / 20000 - 1)).toBeLessThan(0.006);
      expect(Math.abs(found.sweepSeconds - 2)).toBeLessThan(0.003);
      expect(Math.abs(found.startSample - 0.25 * fs)).toBeLessThan(0.0015 * fs);
      // Peak of A·sin: A to within the sampling of the crest (cos(π·f/fs) ≥ 0.999 below 1 kHz; closed form).
      expect(Math.abs(found.amplitude / 0.5 - 1)).toBeLessThan(1e-3);
      // The slope ln(f2/f1)/T = ln(1000)/2 = 3.4539/s: Farina 2000, eq. 2.
      expect(Math.log(found.f2 / found.f1) / found.sweepSeconds).toBeCloseTo(Math.log(1000) / 2, 2);
    });
  }

  it('ignores a 30 kHz pilot at −40 dBFS riding on a 96 kHz sweep (the ±5 % hysteresis)', () => {
    const fs = 96000;
    const clean = sweepReference(fs, 20, 20000, 2, 0.5, { lead: 0.25, fade: 0.01 });
    const pilot = sine(clean.length, fs, 30000, 0.01);
    const found = detectExponentialSweep(clean.map((v, i) => v + (pilot[i] as number)), fs);
    expect(found).not.toBeNull();
    // The pilot lifts the onset threshold to 4× its peak (0.04), met ≈ 6 ms into the 10 ms fade-in:
    // f1 reads up to e^{6 ms·3.45/s} − 1 = 2 % high (closed form); the slope ln(f2/f1)/T stays exact to 0.5 %.
    expect(Math.abs((found?.f1 ?? 0) / 20 - 1)).toBeLessThan(0.025);
    expect(Math.abs(Math.log((found?.f2 ?? 1) / (found?.f1 ?? 1)) / (found?.sweepSeconds ?? 1) / (Math.log(1000) / 2) - 1)).toBeLessThan(0.005);
  });

  it('finds a short, narrow sweep (0.5 s, 200 Hz–4 kHz) and its slope', () => {
    const fs = 48000;
    const found = detectExponentialSweep(sweepReference(fs, 200, 4000, 0.5, 0.9), fs);
    expect(found).not.toBeNull();
    // Without fades the sweep starts at sample 0 with sin(0) = 0: the first sample above −60 dB is sample 1.
    expect(found?.startSample).toBeLessThanOrEqual(1);
    expect(Math.abs((found?.f1 ?? 0) / 200 - 1)).toBeLessThan(0.003);
    expect(Math.abs((found?.f2 ?? 0) / 4000 - 1)).toBeLessThan(0.003);
  });

  describe('is not fooled', () => {
    const fs = 48000;
    const n = 2 * fs;
    const cases: Record<string, () => Float64Array> = {
      'a 1 kHz sine (ln f constant: slope 0)': () => sine(n, fs, 1000, 0.5),
      'a three-tone multitone (crossing rate scattered)': () => {
        const a = sine(n, fs, 100, 0.2);
        const b = sine(n, fs, 1000, 0.2, 1);
        const c = sine(n, fs, 5000, 0.2, 2);
        return a.map((v, i) => v + (b[i] as number) + (c[i] as number));
      },
      'white Gaussian noise': () => gaussian(n, 9, 0.2),
      'an impulse in silence': () => {
        const x = new Float64Array(n);
        x[1000] = 1;
        return x;
      },
      'silence': () => new Float64Array(n),
      'a linear sweep 20 Hz–20 kHz (ln f curved in t)': () => {
        const x = new Float64Array(n);
        for (let i = 0; i < n; i++) {
          const t = i / fs;
          x[i] = 0.5 * Math.sin(2 * Math.PI * (20 * t + ((20000 - 20) / (2 * 2)) * t * t));
        }
        return x;
      },
      'a falling exponential sweep': () => sweepReference(fs, 20, 20000, 2, 0.5, { tail: 0 }).reverse(),
      'two sweeps in a row (ln f saw-tooth)': () => {
        const one = sweepReference(fs, 20, 20000, 1, 0.5, { tail: 0 });
        const x = new Float64Array(2 * one.length);
        x.set(one);
        x.set(one, one.length);
        return x;
      },
    };
    for (const [name, make] of Object.entries(cases)) {
      it(name, () => {
        expect(detectExponentialSweep(make(), fs)).toBeNull();
      });
    }
  });

  it('checks its inputs', () => {
    expect(() => detectExponentialSweep(new Float64Array(100), 0)).toThrow(refusedBy('detectExponentialSweep', /^sampleRate/));
    const x = sweepReference(48000, 20, 20000, 1, 0.5);
    x[5] = Number.NaN;
    expect(() => detectExponentialSweep(x, 48000)).toThrow(refusedBy('detectExponentialSweep', /^sample 5 of the reference is NaN; only finite samples can be analysed$/));
  });
});
