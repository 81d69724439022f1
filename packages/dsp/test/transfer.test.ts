import { describe, expect, it } from 'vitest';
import { estimateLatency, fftConvolve, fftCrossCorrelate } from '../src/transfer/fft-convolution.js';
import { fitLinearPhase } from '../src/masks/phase-fit.js';
import { thirdOctaveMagnitudes } from '../src/transfer/third-octave-magnitude.js';
import type { TransferFunction } from '../src/transfer/transfer-function.js';
import { estimateTransferFunction, impulseResponseByDeconvolution } from '../src/transfer/transfer-function.js';
import { gaussian } from './helpers/signals.js';

const FS = 48000;

/** A transfer estimate as the capture context holds it (no bulk delay removed). */
function channelTransfer(tf: TransferFunction) {
  const mag2 = new Float64Array(tf.re.length);
  for (let k = 0; k < mag2.length; k++) if (tf.valid[k]) mag2[k] = (tf.re[k] as number) ** 2 + (tf.im[k] as number) ** 2;
  return { latencySamples: 0, tf, mag2 };
}

/** Direct-form FIR filter y[n] = Σ h[k]·x[n−k] (the definition of convolution). */
function fir(x: Float64Array, h: readonly number[]): Float64Array {
  const y = new Float64Array(x.length);
  for (let n = 0; n < x.length; n++) {
    let s = 0;
    for (let k = 0; k < h.length && k <= n; k++) s += (h[k] as number) * (x[n - k] as number);
    y[n] = s;
  }
  return y;
}

/** Exponential sine sweep, A. Farina, AES 108th Convention 2000, preprint 5093, eq. (2). */
function expSweep(f1: number, f2: number, seconds: number): Float64Array {
  const n = Math.round(seconds * FS);
  const l = Math.log(f2 / f1);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / FS;
    x[i] = Math.sin(((2 * Math.PI * f1 * seconds) / l) * (Math.exp((t * l) / seconds) - 1));
  }
  return x;
}

describe('convolution and correlation by FFT', () => {
  it('fftConvolve equals the direct convolution sum', () => {
    const a = gaussian(300, 1);
    const b = [0.5, -0.25, 0.125, 0.0625, 1];
    const direct = fir(Float64Array.from([...a, 0, 0, 0, 0]), b);
    const fast = fftConvolve(a, Float64Array.from(b));
    // Rounding of a 1024-point FFT on O(1) data: 1e-12 absolute.
    for (let i = 0; i < direct.length; i++) expect(Math.abs((fast[i] as number) - (direct[i] as number))).toBeLessThan(1e-12);
  });
  it('fftCrossCorrelate follows scipy.signal.correlate(y, x, "full") lag order', () => {
    // r[ℓ] = Σ y[n+ℓ]·x[n]; x = [1, 2], y = [0, 0, 1, 2]: peak 5 at lag 2 (hand computation of the definition)
    const r = fftCrossCorrelate(Float64Array.of(1, 2), Float64Array.of(0, 0, 1, 2));
    expect(r.minLag).toBe(-1);
    const rounded = Array.from(r.values, (v) => Math.round(v * 1e9) / 1e9 + 0);
    expect(rounded).toEqual([0, 0, 2, 5, 2]);
  });
});

describe('latency by cross-correlation', () => {
  for (const delay of [0, 1, 37, 4801]) {
    it(`a delayed copy reads exactly ${delay} samples`, () => {
      const x = gaussian(20000, 3);
      const y = new Float64Array(x.length + delay);
      y.set(x, delay);
      expect(estimateLatency(x, y)).toBe(delay);
    });
  }
  it('finds the delay of a filtered, noisy, inverted copy', () => {
    const x = gaussian(20000, 4);
    const y = new Float64Array(20000 + 250);
    const filtered = fir(x, [-0.9, -0.3, 0.1]);
    const noise = gaussian(y.length, 5, 0.1);
    for (let i = 0; i < y.length; i++) y[i] = (i >= 250 ? (filtered[i - 250] as number) : 0) + (noise[i] as number);
    expect(estimateLatency(x, y)).toBe(250);
  });
});

describe('transfer function', () => {
  it('H1 of a symmetric FIR from white noise: |H| matches the FIR response, group delay (L−1)/2, phase linear', () => {
    const taps = [0.05, 0.2, 0.5, 0.2, 0.05]; // symmetric, L = 5 → τ = 2 samples (Oppenheim & Schafer, linear phase)
    const x = gaussian(2 ** 17, 11);
    const y = fir(x, taps);
    const tf = estimateTransferFunction(x, y, FS, { method: 'h1', segmentLength: 4096 });
    // Analytic response of the FIR, H(e^{jω}) = Σ h[k]e^{−jωk}.
    let worst = 0;
    for (let k = 1; k < tf.re.length; k += 37) {
      const w = (2 * Math.PI * k) / 4096;
      let hr = 0;
      let hi = 0;
      taps.forEach((h, i) => {
        hr += h * Math.cos(w * i);
        hi -= h * Math.sin(w * i);
      });
      if (Math.hypot(hr, hi) < 0.1) continue;
      worst = Math.max(worst, Math.hypot((tf.re[k] as number) - hr, (tf.im[k] as number) - hi) / Math.hypot(hr, hi));
    }
    // Noise-free output: H1 is exact except for the window's smearing of the 5-tap response
    // across a 4096-sample segment (an error O(L/N) ≈ 1e-3).
    expect(worst).toBeLessThan(5e-3);
    const s = fitLinearPhase(channelTransfer(tf), FS);
    expect(Math.abs((s?.meanDelaySeconds ?? 0) * FS - 2)).toBeLessThan(0.01);
    expect(s?.maxDeviationDeg).toBeLessThan(0.5);
  });

  it('deconvolution of an exponential sweep recovers a delay and gain; magnitude reads the gain in dB', () => {
    const sweep = expSweep(20, 20000, 2);
    const delay = 480;
    const y = new Float64Array(sweep.length + 4800);
    for (let i = 0; i < sweep.length; i++) y[i + delay] = 0.5 * (sweep[i] as number);
    const ir = impulseResponseByDeconvolution(sweep, y);
    let peak = 0;
    for (let i = 1; i < ir.length; i++) if (Math.abs(ir[i] as number) > Math.abs(ir[peak] as number)) peak = i;
    expect(peak).toBe(delay);
    // Aligned transfer function over the swept band: gain 0.5 = −6.0206 dB (definition of dB).
    const aligned = y.slice(delay, delay + sweep.length);
    const tf = estimateTransferFunction(sweep, aligned, FS, { method: 'deconvolution' });
    const t = channelTransfer(tf);
    const s = fitLinearPhase(t, FS, [100, 10000]);
    const mid = thirdOctaveMagnitudes(tf, t.mag2).filter((m) => m.centerHz >= 100 && m.centerHz <= 10000);
    expect(mid.length).toBeGreaterThan(15);
    // The sweep's own edges leak a little into the band through truncation: 0.05 dB.
    for (const m of mid) expect(Math.abs(m.db + 6.0206)).toBeLessThan(0.05);
    expect(Math.abs(s?.meanDelaySeconds ?? 1)).toBeLessThan(1e-5);
  });
});
