// Realistic capture helpers for the IMD and crosstalk tests: 24-bit TPDF dither, latency
// lead-in, memoryless polynomials, a first-order leak filter, band-limited noise shelves.
import { gaussian, uniformRng } from '../helpers/signals.js';

/**
 * Quantises to 24 bits with TPDF dither of ±1 LSB (difference of two uniforms): total error
 * variance LSB²/6 + LSB²/12 = LSB²/4, RMS LSB/2 = 2^-24 → 20·log10(2^-24·√2) ≈ −141.5 dBFS
 * (AES17 dBFS; S. P. Lipshitz, R. A. Wannamaker, J. Vanderkooy, "Quantization and dither: a
 * theoretical survey", JAES 40(5), 1992, from memory).
 */
export function dither24(x: Float64Array, seed: number): Float64Array {
  const u = uniformRng(seed);
  const scale = 2 ** 23;
  return x.map((v) => Math.round(v * scale + u() - u()) / scale);
}

/** `samples` zeros (idle: they become dither noise after `dither24`), then x, then `tail` zeros. */
export function withLeadIn(x: Float64Array, samples: number, tail = 0): Float64Array {
  const y = new Float64Array(samples + x.length + tail);
  y.set(x, samples);
  return y;
}

/** Memoryless polynomial y = x + a2·x² + a3·x³. */
export function polynomial(x: Float64Array, a2: number, a3: number): Float64Array {
  return x.map((v) => v + a2 * v * v + a3 * v * v * v);
}

/** One-pole low-pass y[n] = (1 − p)·x[n] + p·y[n−1], p = e^{−2π·fc/fs}, unit gain at DC. */
export function onePoleLowPass(x: Float64Array, cornerHz: number, sampleRate: number): Float64Array {
  const p = Math.exp((-2 * Math.PI * cornerHz) / sampleRate);
  const y = new Float64Array(x.length);
  let prev = 0;
  for (let n = 0; n < x.length; n++) {
    prev = (1 - p) * (x[n] as number) + p * prev;
    y[n] = prev;
  }
  return y;
}

/**
 * |H(e^{jω})|² of `onePoleLowPass`: H = (1 − p)/(1 − p·e^{−jω}), so
 * |H|² = (1 − p)²/(1 − 2p·cos ω + p²) (closed form of the first-order recursion).
 */
export function onePolePower(frequencyHz: number, cornerHz: number, sampleRate: number): number {
  const p = Math.exp((-2 * Math.PI * cornerHz) / sampleRate);
  const w = (2 * Math.PI * frequencyHz) / sampleRate;
  return (1 - p) ** 2 / (1 - 2 * p * Math.cos(w) + p * p);
}

/**
 * Gaussian noise confined to [lowHz, highHz] by summing random-phase sinusoids on a 1 Hz grid
 * would be slow; instead white noise is modulated: a low-pass noise (one-pole, twice) times a
 * carrier at the band centre. Only the RMS matters for the tests (a shelf to stay out of the
 * analysis band), so the shape is approximate; scaled to `dbfs` (AES17 RMS).
 */
export function noiseShelf(length: number, sampleRate: number, lowHz: number, highHz: number, dbfs: number, seed: number): Float64Array {
  const half = (highHz - lowHz) / 2;
  const base = onePoleLowPass(onePoleLowPass(gaussian(length, seed), half / 2, sampleRate), half / 2, sampleRate);
  const centre = (2 * Math.PI * (lowHz + half)) / sampleRate;
  const y = base.map((v, n) => v * Math.cos(centre * n));
  let s = 0;
  for (const v of y) s += v * v;
  const g = 10 ** (dbfs / 20) / Math.SQRT2 / Math.sqrt(s / length);
  return y.map((v) => v * g);
}

/** Adds b into a (same length) and returns a new array. */
export function plus(a: Float64Array, b: Float64Array): Float64Array {
  return a.map((v, i) => v + (b[i] as number));
}

/** A·sin(2π·f·n/fs) for n < length. */
export function tone(length: number, sampleRate: number, frequencyHz: number, amplitude: number): Float64Array {
  const w = (2 * Math.PI * frequencyHz) / sampleRate;
  const y = new Float64Array(length);
  for (let n = 0; n < length; n++) y[n] = amplitude * Math.sin(w * n);
  return y;
}
