import { createSeededRandom } from '../stimulus/seeded-random.js';
import { whiteNoise } from '../stimulus/white-noise.js';
import { precondition } from '../util/preconditions.js';

/**
 * Hard clipping at ±threshold (what a saturating fixed-point path does at full scale).
 * @throws RangeError unless threshold > 0
 */
export function clip(x: Float64Array, threshold: number): Float64Array {
  precondition(threshold > 0, 'clip', `threshold must be > 0 (got ${threshold})`);
  return x.map((v) => Math.max(-threshold, Math.min(threshold, v)));
}

/**
 * Gain change by `db`: every sample times 10^(db/20).
 * @throws RangeError when db is not finite
 * @see definition of the decibel (20·log10 of an amplitude ratio)
 */
export function scaleDb(x: Float64Array, db: number): Float64Array {
  precondition(Number.isFinite(db), 'scaleDb', `db must be finite (got ${db})`);
  const g = 10 ** (db / 20);
  return x.map((v) => v * g);
}

/**
 * Delay by a whole number of samples: `samples` zeros, then x; the result holds `length` samples
 * (default x.length + samples, so nothing of x is lost), truncated or zero-padded at the end.
 * @throws RangeError unless samples and length are whole numbers ≥ 0
 */
export function delay(x: Float64Array, samples: number, length = x.length + samples): Float64Array {
  precondition(Number.isInteger(samples) && samples >= 0, 'delay', `samples must be a whole number ≥ 0 (got ${samples})`);
  precondition(Number.isInteger(length) && length >= 0, 'delay', `length must be a whole number ≥ 0 (got ${length})`);
  const y = new Float64Array(length);
  y.set(x.subarray(0, Math.max(0, Math.min(x.length, length - samples))), Math.min(samples, length));
  return y;
}

/**
 * Adds seeded white Gaussian noise at `dbfs` (AES17: RMS = 10^(dbfs/20)/√2, so −100 dBFS noise
 * has the RMS of a −100 dBFS sine); the noise is scaled to that RMS exactly. Deterministic per seed.
 * @throws RangeError on a non-finite level or a bad seed
 * @see AES17-2020 (dBFS); Box–Muller via the engine's seeded xoshiro128** generator
 */
export function addNoise(x: Float64Array, dbfs: number, seed: number): Float64Array {
  precondition(Number.isFinite(dbfs), 'addNoise', `dbfs must be finite (got ${dbfs})`);
  if (x.length === 0) return new Float64Array(0);
  const noise = whiteNoise(x.length, 10 ** (dbfs / 20) / Math.SQRT2, createSeededRandom(seed));
  return x.map((v, i) => v + (noise[i] as number));
}

/**
 * Adds a constant offset (DC) in full-scale units.
 * @throws RangeError when the offset is not finite
 */
export function addDc(x: Float64Array, offset: number): Float64Array {
  precondition(Number.isFinite(offset), 'addDc', `offset must be finite (got ${offset})`);
  return x.map((v) => v + offset);
}

/**
 * Zeros `length` samples from `start` (a dropout: the path delivered digital silence).
 * @throws RangeError unless the run lies inside x
 */
export function insertDropout(x: Float64Array, start: number, length: number): Float64Array {
  precondition(Number.isInteger(start) && Number.isInteger(length) && start >= 0 && length >= 1 && start + length <= x.length, 'insertDropout', `the run ${start}+${length} must lie inside the ${x.length} samples`);
  const y = Float64Array.from(x);
  y.fill(0, start, start + length);
  return y;
}

/** Multichannel audio as the engine takes it. */
export interface TestAudio {
  sampleRate: number;
  channels: Float64Array[];
}

/**
 * Applies `fn` to every channel (with its index) and returns new audio at the same rate, so a
 * capture can be made from a stimulus in one line: `mapChannels(stimulus, (x) => clip(x, 0.5))`.
 * @throws whatever `fn` throws; nothing of its own
 */
export function mapChannels(audio: { sampleRate: number; channels: readonly Float64Array[] }, fn: (x: Float64Array, channel: number) => Float64Array): TestAudio {
  return { sampleRate: audio.sampleRate, channels: audio.channels.map((x, c) => fn(x, c)) };
}
