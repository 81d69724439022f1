import { describe, expect, it } from 'vitest';
import { filterGroupDelay, groupDelayFromPhase } from '../src/transfer/group-delay.js';
import { expectAllClose } from './helpers/approx.js';
import { loadFixture } from './helpers/fixtures.js';
import { refusedBy } from './helpers/refused.js';

interface GroupDelayFixture {
  groupDelay: { name: string; b: number[]; a: number[]; w: number[]; groupDelay: number[] }[];
}

describe('filterGroupDelay against scipy.signal.group_delay (fixtures)', () => {
  for (const c of loadFixture<GroupDelayFixture>('group-delay.json').groupDelay) {
    it(c.name, () => {
      const gd = filterGroupDelay(Float64Array.from(c.b), Float64Array.from(c.a), Float64Array.from(c.w));
      // source: scipy.signal.group_delay((b, a), w=64). Same formula, polynomial evaluated by a
      // direct sum instead of Horner. Near the Butterworth's fourfold zero at Nyquist |C(e^{jω})|
      // falls to ~1e-7 of its terms, so either evaluation order keeps only ~8 digits of the
      // ratio there: 1e-7 relative with 1e-9 samples absolute.
      expectAllClose(gd, c.groupDelay, 1e-7, 1e-9);
    });
  }
});

describe('group delay of a symmetric FIR (Oppenheim & Schafer, linear-phase FIR systems)', () => {
  it('is (L − 1)/2 samples at every frequency, both from the taps and from the unwrapped phase', () => {
    const taps = Float64Array.from([0.02, -0.05, 0.1, 0.3, 0.45, 0.3, 0.1, -0.05, 0.02]); // L = 9
    const omega = Float64Array.from({ length: 50 }, (_, i) => (i * Math.PI) / 60);
    const gd = filterGroupDelay(taps, undefined, omega);
    // source: a real FIR with h[n] = h[L−1−n] has phase −ω(L−1)/2 (type I), τ = 4 samples exactly.
    for (const v of gd) expect(Math.abs(v - 4)).toBeLessThan(1e-9);
    // Same property from a phase curve: φ(f) = −2πf·τ at fs = 1 gives τ back by differences.
    const freq = Float64Array.from({ length: 20 }, (_, i) => i * 0.01);
    const phase = freq.map((v) => -2 * Math.PI * v * 4);
    for (const v of groupDelayFromPhase(freq, phase)) expect(Math.abs(v - 4)).toBeLessThan(1e-9);
  });
  it('rejects non-increasing frequencies naming the function', () => {
    expect(() => groupDelayFromPhase(Float64Array.of(1, 1), Float64Array.of(0, 0))).toThrow(refusedBy('groupDelayFromPhase'));
  });
});
