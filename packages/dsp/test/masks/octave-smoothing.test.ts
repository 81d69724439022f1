import { describe, expect, it } from 'vitest';
import { smoothFractionalOctave } from '../../src/index.js';
import { refusedBy } from '../helpers/refused.js';

describe('smoothFractionalOctave', () => {
  it('leaves a constant unchanged and spreads one bin over the bins of its 1/N-octave windows', () => {
    const flat = new Float64Array(1000).fill(3);
    for (const v of smoothFractionalOctave(flat, 1, 3)) expect(v).toBeCloseTo(3, 12);
    // A spike of 1 at bin 600: bin k's window is [k·2^(−1/6), k·2^(1/6)] (rectangular, 1/3 octave).
    const spike = new Float64Array(1000);
    spike[600] = 1;
    const s = smoothFractionalOctave(spike, 1, 3);
    const lo = Math.ceil(600 / 2 ** (1 / 6));
    const hi = Math.floor(600 * 2 ** (1 / 6));
    expect(s[600]).toBeCloseTo(1 / (hi - lo + 1), 12);
    // Bins whose window does not reach 600 stay 0.
    expect(s[Math.floor(600 / 2 ** (1 / 6)) - 2]).toBe(0);
  });

  it('averages only included bins', () => {
    const v = Float64Array.from({ length: 200 }, (_, k) => (k % 2 === 0 ? 1 : 100));
    const include = Uint8Array.from({ length: 200 }, (_, k) => (k % 2 === 0 ? 1 : 0));
    const s = smoothFractionalOctave(v, 1, 1, include);
    expect(s[100]).toBe(1);
    expect(() => smoothFractionalOctave(v, 1, 1, new Uint8Array(3))).toThrow(refusedBy('smoothFractionalOctave'));
  });
});
