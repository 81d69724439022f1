import { EngineInputError } from '../util/engine-input-error.js';

/**
 * Decibel conventions (docs/analysis.md): a magnitude in dB is 20·log10|X|, a power
 * 10·log10 P; levels in dBFS follow AES17, where a full-scale sine (peak 1, RMS 1/√2) reads
 * 0 dBFS, so RMS in dBFS = 20·log10(rms·√2).
 */

/** 20·log10(m); −Infinity for 0. @see definition of the decibel */
export function amplitudeToDb(m: number): number {
  return 20 * Math.log10(m);
}

/** 10·log10(p); −Infinity for 0. @see definition of the decibel */
export function powerToDb(p: number): number {
  return 10 * Math.log10(p);
}

/** 10^(db/20). */
export function dbToAmplitude(db: number): number {
  return 10 ** (db / 20);
}

/**
 * RMS value to dBFS with the AES17 convention: 20·log10(rms·√2), so a full-scale sine is 0 dBFS.
 * @see AES17-2020, "full-scale amplitude" definition
 */
export function rmsToDbfs(rms: number): number {
  return 20 * Math.log10(rms * Math.SQRT2);
}

/** Mean-square power to dBFS (AES17): 10·log10(2·P). */
export function meanSquareToDbfs(p: number): number {
  return 10 * Math.log10(2 * p);
}

/**
 * Converts magnitudes to dB in place or into `output`.
 * @throws RangeError when lengths differ
 */
export function magnitudesToDb(magnitude: Float64Array, output: Float64Array = new Float64Array(magnitude.length)): Float64Array {
  if (output.length !== magnitude.length) throw new EngineInputError('magnitudesToDb', 'output length must equal magnitude length');
  for (let i = 0; i < magnitude.length; i++) output[i] = 20 * Math.log10(magnitude[i] as number);
  return output;
}
