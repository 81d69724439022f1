import { EngineInputError } from './engine-input-error.js';

/**
 * Precondition helpers: every public engine function checks its inputs first and throws an
 * EngineInputError (a RangeError) carrying the function's name in `fn`, so a caller can tell
 * which call was wrong without a stack trace. The name stays out of the message: messages
 * reach users (check errors, verdict reasons), who should not read internal function names.
 */

/** True when `n` is an integer power of two ≥ 1. */
export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 1 && (n & (n - 1)) === 0 && n <= 2 ** 30;
}

/** Smallest power of two ≥ n (n ≥ 1). */
export function nextPowerOfTwo(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

/** Throws `EngineInputError(fn, message)` unless `condition` holds. */
export function precondition(condition: boolean, fn: string, message: string): asserts condition {
  if (!condition) throw new EngineInputError(fn, message);
}

/** Throws unless `value` is a finite number > 0. */
export function requirePositive(value: number, fn: string, name: string): void {
  precondition(Number.isFinite(value) && value > 0, fn, `${name} must be a finite number > 0 (got ${value})`);
}

/** Throws unless every sample is finite (NaN or ±Infinity would poison every sum). */
export function requireFinite(x: Float64Array, fn: string, name: string): void {
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i] as number)) throw new EngineInputError(fn, `sample ${i} of ${name} is ${x[i]}; only finite samples can be analysed`);
  }
}
