// Distortion, timing and band-level checks against values from their definitions (AES17,
// IEC 61672-1 A-weighting, IEC 61260-1 bands, Kester's noise relations), each cited inline.
import { describe, expect, it } from 'vitest';
import { aWeightingGain, evaluateMask } from '../../src/index.js';
import { addNoise, applyBiquad, delay, mapChannels, peakingEqCoefficients } from '../../src/testing/index.js';
import { FS, MULTITONE, SWEEP, mask } from './mask-fixtures.js';

/** 997 Hz tone at `dbfs` (AES17 test frequency) plus white noise at `noiseDbfs`, 1 s. */
function toneWithNoise(dbfs: number, noiseDbfs: number): { sampleRate: number; channels: Float64Array[] } {
  const a = 10 ** (dbfs / 20);
  const x = Float64Array.from({ length: FS }, (_, n) => a * Math.sin((2 * Math.PI * 997 * n) / FS));
  return { sampleRate: FS, channels: [addNoise(x, noiseDbfs, 7)] };
}

/** Fraction of white noise's power (spread evenly over 0…fs/2) that lands in 20 Hz…20 kHz, optionally A-weighted (IEC 61672-1 annex E formula, integrated numerically). */
function whiteNoiseInBand(weighted: boolean): number {
  let sum = 0;
  const df = 0.5;
  for (let f = 20; f <= 20000; f += df) sum += (weighted ? aWeightingGain(f) ** 2 : 1) * df;
  return sum / (FS / 2);
}

describe('distortion checks', () => {
  const capture = toneWithNoise(-60, -100);

  it('noise floor: white noise at −100 dBFS reads −100 + 10·log10(in-band share), A-weighted lower', () => {
    const [plain, weighted] = evaluateMask({ capture }, mask(
      { id: 'nf', kind: 'distortion', metric: 'noise-floor-dbfs', max: -90 },
      { id: 'nf-a', kind: 'distortion', metric: 'noise-floor-dbfs', max: -90, weighting: 'a' },
    )).checks;
    // Expected from the noise's construction (exact RMS) and the band: 0.1 dB for the random spectrum.
    expect(Math.abs((plain?.measured ?? 0) - (-100 + 10 * Math.log10(whiteNoiseInBand(false))))).toBeLessThan(0.1);
    expect(Math.abs((weighted?.measured ?? 0) - (-100 + 10 * Math.log10(whiteNoiseInBand(true))))).toBeLessThan(0.1);
    expect(plain?.unit).toBe('dBFS');
  });

  it('dynamic range (AES17): A-weighted THD+N of a −60 dBFS tone plus 60 dB equals minus the A-weighted noise floor', () => {
    const check = evaluateMask({ capture }, mask({ id: 'dr', kind: 'distortion', metric: 'dynamic-range-db', min: 100 })).checks[0];
    // With no harmonics, THD+N_A = N_A − S (dB), so DR = −(N_A − S) − S = −N_A: the A-weighted noise in band.
    const expected = -(-100 + 10 * Math.log10(whiteNoiseInBand(true)));
    expect(Math.abs((check?.measured ?? 0) - expected)).toBeLessThan(0.1);
    expect(check?.pass).toBe(true);
    expect(check?.margin).toBeCloseTo((check?.measured ?? 0) - 100, 12);
  });

  it('dynamic range refuses a tone far from −60 dBFS with an error, not a number', () => {
    const result = evaluateMask({ capture: toneWithNoise(-20, -100) }, mask({ id: 'dr', kind: 'distortion', metric: 'dynamic-range-db', min: 90 }));
    expect(result.verdict).toBe('error');
    expect(result.checks[0]?.error).toMatch(/−60 dBFS|-60 dBFS/);
  });

  it('SNR and THD+N of a −20 dBFS tone in −100 dBFS noise: 80 dB less the in-band share (Kester MT-003)', () => {
    const [snr, thdn, thd] = evaluateMask({ capture: toneWithNoise(-20, -100) }, mask(
      { id: 'snr', kind: 'distortion', metric: 'snr-db', min: 70 },
      { id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -70 },
      { id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 0.01 },
    )).checks;
    const expectedSnr = 80 - 10 * Math.log10(whiteNoiseInBand(false));
    expect(Math.abs((snr?.measured ?? 0) - expectedSnr)).toBeLessThan(0.1);
    // THD+N relative to the total signal ≈ −SNR when noise ≪ signal (AES17).
    expect(Math.abs((thdn?.measured ?? 0) + expectedSnr)).toBeLessThan(0.1);
    expect(thd?.pass).toBe(true);
    expect(thd?.unit).toBe('%');
  });

  it('a capture without a dominant tone fails tone measures with no value (not an error)', () => {
    const result = evaluateMask({ capture: MULTITONE }, mask({ id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 1 }));
    expect(result.verdict).toBe('fail');
    expect(result.checks[0]?.measured).toBeNull();
    expect(result.checks[0]?.details.reason).toMatch(/no dominant tone/i);
  });
});

describe('timing checks', () => {
  it('latency of a copy delayed by 96 samples reads 2 ms exactly', () => {
    const capture = mapChannels(MULTITONE, (x) => delay(x, 96));
    const check = evaluateMask({ capture, reference: MULTITONE }, mask({ id: 'latency', kind: 'timing', metric: 'latency-ms', max: 1.5 })).checks[0];
    // 96 samples at 48 kHz = 2 ms (cross-correlation peak is exact for a delayed copy).
    expect(check?.measured).toBe(2);
    expect(check?.margin).toBeCloseTo(-0.5, 12);
    expect(check?.unit).toBe('ms');
  });

  it('inter-channel delay is signed (b after a) and fails outside ±limit', () => {
    const x = MULTITONE.channels[0] as Float64Array;
    const capture = { sampleRate: FS, channels: [x, delay(x, 3, x.length), x] };
    const check = evaluateMask({ capture }, mask({ id: 'skew', kind: 'timing', metric: 'inter-channel-delay-ms', min: -0.05, max: 0.05 })).checks[0];
    // Channel 1 lags channel 0 by 3 samples = 0.0625 ms; channel 2 is aligned. Sub-sample
    // estimate (interpolated correlation peak): within 0.001 samples = 2e-5 ms.
    expect(check?.pass).toBe(false);
    expect(check?.channel).toBe(1);
    expect(Math.abs((check?.measured ?? 0) - 0.0625)).toBeLessThan(2e-5);
    const swapped = evaluateMask({ capture }, mask({ id: 'skew', kind: 'timing', metric: 'inter-channel-delay-ms', min: -0.05, max: 0.05, pairs: [[1, 0]] })).checks[0];
    expect(Math.abs((swapped?.measured ?? 0) + 0.0625)).toBeLessThan(2e-5);
  });

  it('inter-channel delay on a mono capture is an error', () => {
    const result = evaluateMask({ capture: MULTITONE }, mask({ id: 'skew', kind: 'timing', metric: 'inter-channel-delay-ms', max: 0.1 }));
    expect(result.checks[0]?.error).toMatch(/at least two channels/);
  });
});

describe('band-levels checks', () => {
  it('transfer bands: the +2 dB bump at 8 kHz shows in the 8 kHz 1/3-octave band, matched by its nominal label', () => {
    const coeffs = peakingEqCoefficients(FS, 8000, 2, 2);
    const capture = mapChannels(SWEEP, (x) => applyBiquad(x, coeffs));
    const check = evaluateMask({ capture, reference: SWEEP, transferMethod: 'deconvolution' }, mask({
      id: 'bands', kind: 'band-levels', fraction: 3, measure: 'transfer',
      bands: [{ centerHz: 1000, min: -0.5, max: 0.5 }, { centerHz: 8000, min: -0.5, max: 0.5 }],
    })).checks[0];
    expect(check?.pass).toBe(false);
    // Nominal 8000 Hz is the base-10 band centred on 1000·10^(9/10) = 7943.3 Hz (IEC 61260-1).
    expect(check?.worstHz).toBeCloseTo(1000 * 10 ** 0.9, 6);
    // The band's power-mean |H|² is below the +2 dB peak and above +1 dB (the bump's +1 dB width is about 1/3 octave).
    expect(check?.measured).toBeGreaterThan(1);
    expect(check?.measured).toBeLessThan(2);
  });

  it('level bands: a −20 dBFS 1 kHz sine reads −20 dBFS in the 1 kHz band and silence in the 125 Hz band', () => {
    const sine = { sampleRate: FS, channels: [Float64Array.from({ length: FS }, (_, n) => 0.1 * Math.sin((2 * Math.PI * 1000 * n) / FS))] };
    const check = evaluateMask({ capture: sine }, mask({
      id: 'bands', kind: 'band-levels', fraction: 3, measure: 'level',
      bands: [{ centerHz: 1000, min: -20.1, max: -19.9 }, { centerHz: 125, max: -100 }],
    })).checks[0];
    // Amplitude 0.1 = −20 dBFS (AES17); the band sums the Hann power spectrum, so the level is the sine's.
    const rows = check?.details.bands as { centerHz: number; measured: number }[];
    expect(rows.find((r) => r.centerHz === 1000)?.measured).toBeCloseTo(-20, 2);
    expect(check?.pass).toBe(true);
  });
});
