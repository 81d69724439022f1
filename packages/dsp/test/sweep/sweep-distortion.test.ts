import { describe, expect, it } from 'vitest';
import { analyzeSweep } from '../../src/transfer/sweep-analysis.js';
import { sweepDistortionByBand, type SweepBandDistortion } from '../../src/transfer/sweep-distortion.js';
import { addNoise } from '../../src/testing/index.js';
import { captureOf, sweepReference } from './sweep-signals.js';
import { refusedBy } from '../helpers/refused.js';

function band(rows: SweepBandDistortion[], centerHz: number): SweepBandDistortion {
  const row = rows.find((r) => r.centerHz === centerHz);
  if (!row) throw new Error(`no ${centerHz} Hz band`);
  return row;
}

/** A capture of `shape` applied to the reference: 240 samples of idle 24-bit dither first, −120 dBFS noise. */
function distort(reference: Float64Array, shape: (v: number) => number): Float64Array {
  return addNoise(captureOf(reference.map(shape), 240, 4800, 3), -120, 4);
}

describe('sweepDistortionByBand: harmonic distortion of a memoryless polynomial (closed forms)', () => {
  // Memoryless y = Σ a_k·x^k driven by A·sin θ: the powers of a sine, sin²θ = (1 − cos 2θ)/2,
  // sin³θ = (3 sin θ − sin 3θ)/4, sin⁵θ = (10 sin θ − 5 sin 3θ + sin 5θ)/16, give each harmonic's
  // amplitude; the ratios below are relative to the fundamental's amplitude.
  const fs = 48000;
  const full = sweepReference(fs, 20, 20000, 2, 1, { fade: 0.005 });

  it('y = x + 0.02·x³ at 0 dBFS: H3 = (0.02/4)/(1 + 3·0.02/4) = 0.4926 %, H2 = 0', () => {
    const rows = sweepDistortionByBand(analyzeSweep(full, distort(full, (v) => v + 0.02 * v ** 3), fs));
    for (const f of [63, 100, 250, 1000, 2500, 5000]) {
      const row = band(rows, f);
      expect(row.h3Percent).not.toBeNull();
      expect(Math.abs((row.h3Percent ?? 0) - 0.49261)).toBeLessThan(0.002);
      expect(row.h2Percent).toBeLessThan(0.005);
      expect(Math.abs(row.thdPercent - 0.49261)).toBeLessThan(0.003);
    }
  });

  it('y = x + 0.04·x² at −6 dBFS (A = 0.5): H2 = a2·A/2 = 1 %', () => {
    const half = sweepReference(fs, 20, 20000, 2, 0.5, { fade: 0.005 });
    const rows = sweepDistortionByBand(analyzeSweep(half, distort(half, (v) => v + 0.04 * v * v), fs));
    for (const f of [63, 200, 1000, 4000, 8000]) expect(Math.abs((band(rows, f).h2Percent ?? 0) - 1)).toBeLessThan(0.005);
    // x² makes no 3rd harmonic.
    expect(band(rows, 1000).h3Percent).toBeLessThan(0.005);
  });

  it('y = x + 0.04·x² + 0.02·x³ at 0 dBFS: H2 = 0.02/1.015 = 1.9704 %, H3 = 0.4926 %, THD = √(H2² + H3²) = 2.0311 %', () => {
    const rows = sweepDistortionByBand(analyzeSweep(full, distort(full, (v) => v + 0.04 * v * v + 0.02 * v ** 3), fs));
    const row = band(rows, 1000);
    expect(Math.abs((row.h2Percent ?? 0) - 1.97044)).toBeLessThan(0.005);
    expect(Math.abs((row.h3Percent ?? 0) - 0.49261)).toBeLessThan(0.003);
    expect(Math.abs(row.thdPercent - 2.03108)).toBeLessThan(0.006);
    expect(row.highestOrder).toBe(5);
    // The 8 kHz band reaches 8.9 kHz: its 2nd harmonic (≤ 17.8 kHz) is inside the sweep, its 3rd is not.
    const high = band(rows, 8000);
    expect(high.h2Percent).not.toBeNull();
    expect(high.h3Percent).toBeNull();
    expect(high.highestOrder).toBe(2);
    // No band above f2/2 = 10 kHz: its 2nd harmonic lies above the sweep.
    expect(rows.every((r) => r.centerHz <= 10000)).toBe(true);
  });

  it('96 kHz, y = x + 0.08·x⁵ at 0 dBFS: H3 = 5·0.08/16/1.05 = 2.381 %, H5 = 0.08/16/1.05 = 0.4762 %', () => {
    const fs96 = 96000;
    const reference = sweepReference(fs96, 20, 20000, 2, 1, { fade: 0.005 });
    const rows = sweepDistortionByBand(analyzeSweep(reference, distort(reference, (v) => v + 0.08 * v ** 5), fs96));
    // Fundamental gain 1 + 10·0.08/16 = 1.05.
    for (const f of [100, 1000, 3150]) {
      const row = band(rows, f);
      expect(Math.abs((row.h3Percent ?? 0) - 2.38095)).toBeLessThan(0.01);
      expect(row.h2Percent).toBeLessThan(0.005);
      expect(row.highestOrder).toBe(5);
      // THD = √(H3² + H5²) = 2.4281 % (H2 = H4 = 0).
      expect(Math.abs(row.thdPercent - 2.42811)).toBeLessThan(0.01);
    }
  });

  it('returns nothing but checks the fraction', () => {
    const a = analyzeSweep(full, full, fs);
    // A wire: every band reads (numerically) no distortion.
    for (const row of sweepDistortionByBand(a)) expect(row.thdPercent).toBeLessThan(0.001);
    expect(() => sweepDistortionByBand(a, { fraction: 5 as 3 })).toThrow(refusedBy('sweepDistortionByBand', /^fraction/));
  });
});
