/**
 * Signal makers for the timing and integrity tests: fractional delays, drifting clocks, dither
 * and band-limited noise, built from definitions (not from the code under test).
 */
import { createRealFftPlan } from '../../src/fft/real-fft.js';
import { applyFades } from '../../src/stimulus/fade.js';
import { exponentialSweep } from '../../src/stimulus/sweep.js';
import { nextPowerOfTwo } from '../../src/util/preconditions.js';
import { gaussian, uniformRng } from '../helpers/signals.js';

/**
 * x delayed by `d` samples (any real d ≥ 0) into `length` samples: X_k·e^{−iω_k·d} on a zero-padded
 * FFT (the shift theorem, Oppenheim & Schafer §8.5), the Nyquist bin kept real as cos(π·d)·X.
 * Exact for a band-limited x that is silent at its ends (the zero padding keeps it linear).
 */
export function fractionalDelay(x: Float64Array, d: number, length = x.length + Math.ceil(d)): Float64Array {
  const n = nextPowerOfTwo(Math.max(length, x.length) + Math.ceil(Math.abs(d)) + 64);
  const plan = createRealFftPlan(n);
  const buf = new Float64Array(n);
  buf.set(x);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  for (let k = 0; k < plan.bins; k++) {
    const w = (-2 * Math.PI * k * d) / n;
    const c = Math.cos(w);
    const s = Math.sin(w);
    const r = (re[k] as number) * c - (im[k] as number) * s;
    im[k] = (re[k] as number) * s + (im[k] as number) * c;
    re[k] = r;
  }
  plan.inverse(re, im, buf);
  return buf.slice(0, length);
}

/** White Gaussian noise brick-wall band-limited to [0, fHi] by zeroing FFT bins, scaled to `rms`. */
export function bandLimitedNoise(length: number, sampleRate: number, fHi: number, rms: number, seed: number): Float64Array {
  const n = nextPowerOfTwo(length);
  const plan = createRealFftPlan(n);
  const buf = gaussian(n, seed);
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  for (let k = 0; k < plan.bins; k++) {
    if ((k * sampleRate) / n > fHi) {
      re[k] = 0;
      im[k] = 0;
    }
  }
  plan.inverse(re, im, buf);
  const y = buf.slice(0, length);
  let s = 0;
  for (const v of y) s += v * v;
  const g = rms / Math.sqrt(s / length);
  return y.map((v) => v * g);
}

/**
 * TPDF dither of ±1 LSB at `bits` (sum of two independent uniforms of ±½ LSB): RMS = LSB/√6,
 * at 24 bits 2⁻²³/√6 ≈ 4.9e-8, i.e. −143 dBFS by AES17's sine-referenced dBFS (closed form).
 */
export function tpdfDither(length: number, bits: number, seed: number): Float64Array {
  const lsb = 2 ** (1 - bits);
  const u = uniformRng(seed);
  const x = new Float64Array(length);
  for (let i = 0; i < length; i++) x[i] = lsb * (u() - 0.5 + (u() - 0.5));
  return x;
}

/** Element-wise a + b (lengths must agree). */
export function add(a: Float64Array, b: Float64Array): Float64Array {
  return a.map((v, i) => v + (b[i] as number));
}

/** Exponential sweep (Farina 2000) with 10 ms raised-cosine fades, as the stimulus generator plays it. */
export function fadedSweep(sampleRate: number, f1: number, f2: number, seconds: number, amplitude: number): Float64Array {
  const x = exponentialSweep(sampleRate, f1, f2, seconds, amplitude);
  const fade = Math.round(0.01 * sampleRate);
  applyFades(x, fade, fade);
  return x;
}

/**
 * Reads x on a clock running `ppm` fast and `latency` samples late: y[m] = x((m − latency)/(1 + ppm·10⁻⁶))
 * by windowed-sinc interpolation over ±16 samples (Oppenheim & Schafer §4.6 band-limited
 * reconstruction; window (1 − (u/16)²)², a smooth polynomial taper). sin(π(t − i)) is
 * (−1)^(i₀−i)·sin(π(t − i₀)), so one sine per output sample.
 */
export function resampleWithDrift(x: Float64Array, ppm: number, latency: number, length: number): Float64Array {
  const ratio = 1 + ppm * 1e-6;
  const half = 16;
  const y = new Float64Array(length);
  for (let m = 0; m < length; m++) {
    const t = (m - latency) / ratio;
    const i0 = Math.floor(t);
    const frac = t - i0;
    const s0 = Math.sin(Math.PI * frac) / Math.PI;
    let acc = 0;
    for (let i = i0 - half + 1; i <= i0 + half; i++) {
      if (i < 0 || i >= x.length) continue;
      const u = t - i;
      const sign = (i0 - i) % 2 === 0 ? 1 : -1;
      const sinc = u === 0 ? 1 : (sign * s0) / u;
      const v = u / half;
      const w = (1 - v * v) ** 2;
      acc += (x[i] as number) * sinc * w;
    }
    y[m] = acc;
  }
  return y;
}
