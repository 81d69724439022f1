/**
 * Realistic test captures for the audio-band measures: TPDF-dithered quantisation, ultrasonic
 * pilots, band-limited noise shelves, latency gaps filled with idle noise, mild cubic
 * nonlinearity.
 */
import { createRealFftPlan } from '../../src/fft/real-fft.js';
import { createSeededRandom } from '../../src/stimulus/seeded-random.js';
import { nextPowerOfTwo } from '../../src/util/preconditions.js';

/** A·sin(2πfn/fs + φ). */
export function tone(length: number, sampleRate: number, frequency: number, amplitude: number, phase = 0.3): Float64Array {
  const x = new Float64Array(length);
  const w = (2 * Math.PI * frequency) / sampleRate;
  for (let n = 0; n < length; n++) x[n] = amplitude * Math.sin(w * n + phase);
  return x;
}

/** Sine amplitude of a level in dBFS (AES17: full-scale sine = 0 dBFS). */
export const dbfs = (level: number): number => 10 ** (level / 20);

/** x + y, in place in x. */
export function addInto(x: Float64Array, y: Float64Array, offset = 0): Float64Array {
  for (let i = 0; i < y.length && i + offset < x.length; i++) x[i + offset] = (x[i + offset] as number) + (y[i] as number);
  return x;
}

/**
 * Rounds to a `bits`-bit grid (step Δ = 2^(1−bits)) after adding TPDF dither of ±1 LSB
 * (difference of two uniforms). The total error is then signal-independent with variance
 * Δ²/12 + Δ²/6 = Δ²/4 (Lipshitz, Wannamaker, Vanderkooy, "Quantization and dither: a
 * theoretical survey", JAES 40(5), 1992).
 */
export function tpdfQuantise(x: Float64Array, bits: number, seed: number): Float64Array {
  const random = createSeededRandom(seed);
  const scale = 2 ** (bits - 1);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Math.round((x[i] as number) * scale + random.next() - random.next()) / scale;
  return out;
}

/** Rounding to a `bits`-bit grid without dither. */
export function roundQuantise(x: Float64Array, bits: number): Float64Array {
  const scale = 2 ** (bits - 1);
  return x.map((v) => Math.round(v * scale) / scale);
}

/**
 * Gaussian noise band-limited to [lo, hi] Hz by zeroing FFT bins outside it, scaled so its
 * mean square is exactly `meanSquare`.
 */
export function bandNoise(length: number, sampleRate: number, lo: number, hi: number, meanSquare: number, seed: number): Float64Array {
  const random = createSeededRandom(seed);
  const plan = createRealFftPlan(nextPowerOfTwo(length));
  const buf = new Float64Array(plan.size);
  for (let i = 0; i < plan.size; i++) buf[i] = random.nextGaussian();
  const re = new Float64Array(plan.bins);
  const im = new Float64Array(plan.bins);
  plan.forward(buf, re, im);
  for (let k = 0; k < plan.bins; k++) {
    const f = (k * sampleRate) / plan.size;
    if (f < lo || f > hi) {
      re[k] = 0;
      im[k] = 0;
    }
  }
  plan.inverse(re, im, buf);
  const out = buf.slice(0, length);
  let ms = 0;
  for (const v of out) ms += v * v;
  const g = Math.sqrt(meanSquare / (ms / length));
  return out.map((v) => v * g);
}

/** y = x + c·x³ (mild odd-order nonlinearity). */
export function cubic(x: Float64Array, c: number): Float64Array {
  return x.map((v) => v + c * v * v * v);
}

/** Leading gap of `latency` zero samples, then x (same total length + latency). */
export function delayed(x: Float64Array, latency: number): Float64Array {
  const out = new Float64Array(x.length + latency);
  out.set(x, latency);
  return out;
}
