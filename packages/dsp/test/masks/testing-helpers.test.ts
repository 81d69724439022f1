// @earmark/dsp/testing: the signal helpers other suites build captures with. Expected values
// from the RBJ Audio EQ Cookbook, the Butterworth response, symmetric-FIR linear phase and AES17.
import { describe, expect, it } from 'vitest';
import { filterGroupDelay } from '../../src/index.js';
import {
  addNoise, applyBiquad, applyFir, biquadResponse, clip, delay, firMagnitudeDb, insertDropout, lowPassBiquadCoefficients, mapChannels, peakingEqCoefficients, scaleDb, windowedSincLowPass,
} from '../../src/testing/index.js';
import { refusedBy } from '../helpers/refused.js';

const FS = 48000;

describe('biquads', () => {
  it('peakingEQ has exactly its gain at f0 and 0 dB at DC and Nyquist (Audio EQ Cookbook)', () => {
    const c = peakingEqCoefficients(FS, 8000, 2, 2);
    expect(biquadResponse(c, FS, 8000).magnitudeDb).toBeCloseTo(2, 12);
    expect(biquadResponse(c, FS, 0).magnitudeDb).toBeCloseTo(0, 12);
    expect(biquadResponse(c, FS, FS / 2).magnitudeDb).toBeCloseTo(0, 9);
  });

  it('a steady 8 kHz sine through the bump grows by 2 dB (applyBiquad runs the difference equation)', () => {
    const x = Float64Array.from({ length: 9600 }, (_, n) => Math.sin((2 * Math.PI * 8000 * n) / FS));
    const y = applyBiquad(x, peakingEqCoefficients(FS, 8000, 2, 2));
    // Amplitude of the settled output by quadrature over whole periods (8 kHz = fs/6: 4800 samples
    // are 800 periods): a = (2/N)·Σy·sin, b = (2/N)·Σy·cos; expected 10^(2/20) (cookbook: gain at f0).
    let a = 0;
    let b = 0;
    for (let n = 4800; n < 9600; n++) {
      a += (y[n] as number) * Math.sin((2 * Math.PI * 8000 * n) / FS);
      b += (y[n] as number) * Math.cos((2 * Math.PI * 8000 * n) / FS);
    }
    expect(Math.hypot(a, b) * (2 / 4800)).toBeCloseTo(10 ** (2 / 20), 6);
  });

  it('the Q = 1/√2 low-pass is a 2nd-order Butterworth: −3.01 dB at f0', () => {
    const c = lowPassBiquadCoefficients(FS, 8000);
    expect(biquadResponse(c, FS, 8000).magnitudeDb).toBeCloseTo(-10 * Math.log10(2), 9);
    expect(biquadResponse(c, FS, 0).magnitudeDb).toBeCloseTo(0, 12);
    expect(() => lowPassBiquadCoefficients(FS, 30000)).toThrow(refusedBy('lowPassBiquadCoefficients'));
  });
});

describe('windowed-sinc FIR', () => {
  it('has symmetric taps, 0 dB at DC, and a group delay of exactly (L − 1)/2 samples', () => {
    const h = windowedSincLowPass(FS, 8000, 63);
    for (let n = 0; n < 63; n++) expect(h[n]).toBeCloseTo(h[62 - n] as number, 15);
    expect(firMagnitudeDb(h, FS, 0)).toBeCloseTo(0, 12);
    // Oppenheim & Schafer §5.7: symmetric taps → τ = (L − 1)/2 = 31 samples everywhere in the passband.
    const gd = filterGroupDelay(h, Float64Array.of(1), Float64Array.of(0.1, 0.5, 1.0));
    for (const v of gd) expect(v).toBeCloseTo(31, 9);
    // Similar magnitude to the Butterworth biquad at the same cut-off: both within 3.5 dB of −3 dB at 8 kHz.
    expect(Math.abs(firMagnitudeDb(h, FS, 8000) + 6)).toBeLessThan(0.5);
  });

  it('applyFir is the convolution sum: an impulse returns the taps', () => {
    const h = windowedSincLowPass(FS, 5000, 15);
    const x = new Float64Array(20);
    x[0] = 1;
    expect(Array.from(applyFir(x, h).subarray(0, 15))).toEqual(Array.from(h));
  });
});

describe('signal operations', () => {
  const x = Float64Array.from([0.5, -2, 1.5, 0.25]);

  it('clip, scaleDb, delay and insertDropout do what their names say and leave the input alone', () => {
    expect(Array.from(clip(x, 1))).toEqual([0.5, -1, 1, 0.25]);
    // −6.0206 dB halves an amplitude (definition of the dB).
    expect(scaleDb(x, -20 * Math.log10(2))[1]).toBeCloseTo(-1, 12);
    expect(Array.from(delay(x, 2))).toEqual([0, 0, 0.5, -2, 1.5, 0.25]);
    expect(Array.from(delay(x, 2, 4))).toEqual([0, 0, 0.5, -2]);
    expect(Array.from(insertDropout(x, 1, 2))).toEqual([0.5, 0, 0, 0.25]);
    expect(Array.from(x)).toEqual([0.5, -2, 1.5, 0.25]);
  });

  it('addNoise adds noise of exactly the requested AES17 level, the same for the same seed', () => {
    const silent = new Float64Array(48000);
    const n = addNoise(silent, -40, 3);
    let s = 0;
    for (const v of n) s += v * v;
    // AES17: RMS in dBFS = 20·log10(rms·√2).
    expect(20 * Math.log10(Math.sqrt(s / n.length) * Math.SQRT2)).toBeCloseTo(-40, 9);
    expect(addNoise(silent, -40, 3)).toEqual(n);
    expect(addNoise(silent, -40, 4)).not.toEqual(n);
  });

  it('mapChannels builds a capture from a stimulus channel by channel', () => {
    const audio = mapChannels({ sampleRate: FS, channels: [x, x] }, (c, i) => scaleDb(c, i === 0 ? 0 : -6));
    expect(audio.sampleRate).toBe(FS);
    expect(audio.channels[0]).toEqual(x);
    expect(audio.channels[1]?.[0]).toBeCloseTo(0.5 * 10 ** (-6 / 20), 12);
  });
});
