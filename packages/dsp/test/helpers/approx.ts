import { expect } from 'vitest';

/**
 * Asserts |actual[i] − expected[i]| ≤ atol + rtol·|expected[i]| for every i (numpy.allclose
 * semantics), reporting the first failing index.
 */
export function expectAllClose(actual: ArrayLike<number>, expected: ArrayLike<number>, rtol: number, atol = 0): void {
  expect(actual.length).toBe(expected.length);
  for (let i = 0; i < expected.length; i++) {
    const a = actual[i] as number;
    const e = expected[i] as number;
    if (!(Math.abs(a - e) <= atol + rtol * Math.abs(e))) {
      expect.fail(`index ${i}: ${a} differs from ${e} by ${Math.abs(a - e)} (rtol ${rtol}, atol ${atol})`);
    }
  }
}

/** Largest |x[i]|. */
export function maxAbs(x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i] as number));
  return m;
}
