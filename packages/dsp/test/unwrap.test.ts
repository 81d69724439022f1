import { describe, expect, it } from 'vitest';
import { unwrapPhase } from '../src/spectrum/unwrap.js';
import { expectAllClose } from './helpers/approx.js';
import { loadFixture } from './helpers/fixtures.js';
import { refusedBy } from './helpers/refused.js';

interface UnwrapFixture {
  unwrap: { name: string; discont: number | null; input: number[]; output: number[] }[];
}

describe('unwrapPhase against numpy.unwrap (fixtures)', () => {
  for (const c of loadFixture<UnwrapFixture>('unwrap.json').unwrap) {
    it(c.name, () => {
      const out = unwrapPhase(Float64Array.from(c.input), undefined, c.discont ?? Math.PI);
      // source: numpy.unwrap(p[, discont]); differences come only from the order of the
      // modulo's rounding, a few ε of values up to ~1e3 rad.
      expectAllClose(out, c.output, 0, 1e-11);
    });
  }
  it('rejects a negative threshold naming the function', () => {
    expect(() => unwrapPhase(new Float64Array(3), undefined, -1)).toThrow(refusedBy('unwrapPhase'));
  });
});
