import { describe, expect, it } from 'vitest';
import { measureToneDistortion } from '../src/measures/tone-distortion.js';
import { fitSineFourParameter } from '../src/measures/sine-fit.js';
import { gaussian, quantise, sine } from './helpers/signals.js';

const FS = 48000;
const N = 65536;

/** Ideal N-bit quantiser SNR for a full-scale sine over DC…fs/2: 10·log10(1.5·2^(2N)) = 6.02N + 1.76 dB. */
const idealSnr = (bits: number): number => 10 * Math.log10(1.5 * 2 ** (2 * bits));

describe('four-parameter sine fit (IEEE Std 1241)', () => {
  it('recovers frequency, amplitude and offset of a noisy tone between bins', () => {
    const x = sine(N, FS, 997.3, 0.5, 1.1, 0.02);
    const noise = gaussian(N, 7, 1e-3);
    for (let i = 0; i < N; i++) x[i] = (x[i] as number) + (noise[i] as number);
    const fit = fitSineFourParameter(x, FS, 997.0);
    // Cramér–Rao bound for σ = 1e-3, A = 0.5, N = 65536: σ_f ≈ fs·√(12)·σ/(2π·A·N^1.5) ≈ 1e-7 Hz;
    // σ_A ≈ σ·√(2/N) ≈ 6e-6. Tolerances are ~10× those bounds.
    expect(Math.abs(fit.frequencyHz - 997.3)).toBeLessThan(2e-6);
    expect(Math.abs(fit.amplitude - 0.5)).toBeLessThan(6e-5);
    expect(Math.abs(fit.dc - 0.02)).toBeLessThan(6e-5);
  });
});

// Through the engine's one tone pipeline (measureToneDistortion: sine fit, AES17 band power).
describe('quantiser SNR (W. Kester, Analog Devices MT-001: SNR = 6.02·N + 1.76 dB)', () => {
  const amplitude = 1 - 2 ** -15; // the largest 16-bit code, so the sine does not clip
  const cases: [number, number, string][] = [
    [16, (1361 * FS) / N, 'on a bin centre'],
    [16, 997, 'between bins (997 Hz, AES17 test tone)'],
    [24, (1361 * FS) / N, 'on a bin centre'],
    [24, 997, 'between bins'],
  ];
  for (const [bits, f, where] of cases) {
    it(`${bits}-bit tone ${where}`, () => {
      const x = quantise(sine(N, FS, f, amplitude, 0.25), bits);
      const amplitudeDb = 20 * Math.log10(amplitude);
      // Full band DC…fs/2: 6.02N + 1.76 dB (16 bit: 98.09 dB; 24 bit: 146.26 dB).
      const full = measureToneDistortion(x, FS, { bandHz: [0, FS / 2], window: [0, x.length] });
      // Band-limited to 20 Hz…20 kHz: add 10·log10((fs/2)/B) (MT-001, processing gain).
      const band = measureToneDistortion(x, FS, { window: [0, N] });
      // Tolerance 0.15 dB: the noise power of 65536 samples is estimated to ~0.6 % (0.03 dB);
      // the rest covers the quantisation error of a sine not being exactly uniform.
      expect(Math.abs((full.tone?.snrDb ?? 0) - (idealSnr(bits) + amplitudeDb))).toBeLessThan(0.15);
      expect(Math.abs((band.tone?.snrDb ?? 0) - (idealSnr(bits) + amplitudeDb + 10 * Math.log10(FS / 2 / 19980)))).toBeLessThan(0.15);
      // ENOB from full-band SINAD ≈ N bits (IEEE Std 1241: ENOB = (SINAD − 1.76)/6.02).
      expect(Math.abs((full.tone?.enob ?? 0) - bits)).toBeLessThan(0.05);
    });
  }
});

describe('THD of band-limited waves (Fourier series, finite sums below Nyquist)', () => {
  /** Σ b_k·sin(2πk f t) for every harmonic k with k·f < fs/2. */
  function series(f: number, coefficient: (k: number) => number): Float64Array {
    const x = new Float64Array(N);
    for (let k = 1; k * f < FS / 2; k++) {
      const b = coefficient(k);
      if (b === 0) continue;
      for (let n = 0; n < N; n++) x[n] = (x[n] as number) + b * Math.sin((2 * Math.PI * k * f * n) / FS);
    }
    return x;
  }
  /** 100·√(Σ_{k=2…10, k·f < fs/2} b_k²)/b_1 — the definition applied to the series' own coefficients. */
  function expectedThd(f: number, coefficient: (k: number) => number): number {
    let s = 0;
    for (let k = 2; k <= 10 && k * f < FS / 2; k++) s += coefficient(k) ** 2;
    return (100 * Math.sqrt(s)) / coefficient(1);
  }
  // Square wave: b_k = 4/(πk) for odd k (infinite-series THD √(π²/8 − 1) = 48.34 %; harmonics
  // 2…10 only give 42.9 %). Sawtooth: b_k = 2/(πk)·(−1)^{k+1} (infinite THD √(π²/6 − 1) = 80.3 %).
  const square = (k: number): number => (k % 2 === 1 ? 4 / (Math.PI * k) : 0);
  const sawtooth = (k: number): number => ((k % 2 === 1 ? 1 : -1) * 2) / (Math.PI * k);
  const cases: [string, number, (k: number) => number][] = [
    ['square, 1 kHz (harmonics 2…10 all below Nyquist)', 1000, square],
    ['square, 3.1 kHz between bins (harmonics 9 and up above Nyquist)', 3100.37, square],
    ['sawtooth, 997 Hz', 997, sawtooth],
    ['sawtooth, 2.9 kHz (harmonics 9, 10 above Nyquist)', 2900.5, sawtooth],
  ];
  for (const [name, f, coefficient] of cases) {
    it(name, () => {
      const r = measureToneDistortion(series(f, coefficient), FS, { window: [0, N] });
      // The fit is exact when every harmonic below Nyquist is in the model (3.1 and 2.9 kHz cases).
      // At 1 kHz, harmonics 11 and up stay outside the model (THD counts 2…10); over a record
      // that is not a whole number of periods they correlate with the model terms by O(1/(N·Δω)),
      // ~1e-5 relative here: tolerance 1e-4 relative.
      const expected = expectedThd(f, coefficient);
      expect(Math.abs((r.tone?.thdPercent ?? 0) - expected) / expected).toBeLessThan(1e-4);
      // Same bias on the frequency: ~1e-5 Hz at most; 1e-4 Hz is 1e-7 relative.
      expect(Math.abs((r.tone?.fundamentalHz ?? 0) - f)).toBeLessThan(1e-4);
    });
  }
  it('the infinite-series limits hold as the finite sums grow (square 48.34 %, sawtooth 80.3 %)', () => {
    // Sanity of the coefficients above against the published closed forms (REFERENCES.md).
    let sq = 0;
    let saw = 0;
    for (let k = 2; k < 200000; k++) {
      sq += square(k) ** 2;
      saw += sawtooth(k) ** 2;
    }
    expect(Math.abs((100 * Math.sqrt(sq)) / square(1) - 100 * Math.sqrt(Math.PI ** 2 / 8 - 1))).toBeLessThan(0.01);
    expect(Math.abs((100 * Math.sqrt(saw)) / sawtooth(1) - 100 * Math.sqrt(Math.PI ** 2 / 6 - 1))).toBeLessThan(0.01);
  });
});

describe('THD+N and noise floor', () => {
  it('a tone plus white noise of known variance: THD+N and the noise floor follow from σ²', () => {
    const sigma = 1e-4;
    const x = sine(N, FS, 1234.5, 0.5);
    const noise = gaussian(N, 99, sigma);
    for (let i = 0; i < N; i++) x[i] = (x[i] as number) + (noise[i] as number);
    const r = measureToneDistortion(x, FS, { window: [0, N] });
    // White noise of variance σ² puts σ²·B/(fs/2) into the 20 Hz…20 kHz band.
    const inBand = (sigma ** 2 * 19980) / (FS / 2);
    const signal = 0.5 ** 2 / 2;
    // Tolerance 0.1 dB: the estimate of σ² from 65536 samples has ~0.6 % spread (0.03 dB).
    expect(Math.abs((r.tone?.thdnDb ?? 0) - 10 * Math.log10(inBand / (signal + inBand)))).toBeLessThan(0.1);
    expect(Math.abs((r.noiseFloorDbfs ?? 0) - 10 * Math.log10(2 * inBand))).toBeLessThan(0.1);
    expect(r.tone?.thdPercent).toBeLessThan(0.01);
  });
  it('reports no tone for white noise, and a noise floor equal to its in-band power', () => {
    const x = gaussian(N, 5, 0.1);
    const r = measureToneDistortion(x, FS, { window: [0, N] });
    expect(r.tone).toBeNull();
    expect(Math.abs((r.noiseFloorDbfs ?? 0) - 10 * Math.log10((2 * 0.01 * 19980) / 24000))).toBeLessThan(0.1);
  });
});
