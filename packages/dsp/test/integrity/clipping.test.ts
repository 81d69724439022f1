import { describe, expect, it } from 'vitest';
import { detectClipping } from '../../src/measures/clipping.js';
import { clip } from '../../src/testing/signal-ops.js';
import { gaussian, sine } from '../helpers/signals.js';

/** Quantises to N-bit two's complement as a converter does: round, then clamp to the top code (2^{N−1} − 1). */
function pcm(x: Float64Array, bits: number): Float64Array {
  const s = 2 ** (bits - 1);
  return x.map((v) => Math.max(-s, Math.min(s - 1, Math.round(v * s))) / s);
}

/** Samples with |x| ≥ level: the ones a clipper at `level` flattens (definition). */
function countAtOrAbove(x: Float64Array, level: number): number {
  let n = 0;
  for (const v of x) if (Math.abs(v) >= level) n++;
  return n;
}

describe('detectClipping', () => {
  it.each([44100, 48000, 96000, 192000])('counts 0 for a clean 0 dBFS 16-bit 997 Hz sine at %i Hz (the old threshold counted peaks)', (fs) => {
    const x = pcm(sine(fs, fs, 997, 1), 16);
    const r = detectClipping(x);
    expect(r.clippedSamples).toBe(0); // AES17: a sine whose peak reaches full scale is 0 dBFS, not clipped
    expect(r.clippedRuns).toBe(0);
    // Before engine 1.0 measureLevels counted every sample on the top code 32767 (|sin| ≥ 1 − 1.5·2⁻¹⁵)
    // as clipped: more than 100 at 48 kHz here.
  });

  it('counts 0 for a 0 dBFS 16-bit 20 Hz sine whose peaks sit on the top code for several samples', () => {
    const fs = 48000;
    const x = pcm(sine(fs, fs, 20, 1), 16);
    // Closed form: |sin| ≥ 1 − 1.5·2⁻¹⁵ for |Δφ| ≤ √(3·2⁻¹⁵) = 9.6e-3 rad, ±3.6 samples at 20 Hz.
    let longest = 0;
    let run = 0;
    for (const v of x) {
      run = v === 32767 / 32768 ? run + 1 : 0;
      longest = Math.max(longest, run);
    }
    expect(longest).toBeGreaterThanOrEqual(5);
    expect(detectClipping(x).clippedSamples).toBe(0);
  });

  it('counts every flattened sample of a sine clipped at 0.9 FS (the old threshold counted 0)', () => {
    const fs = 48000;
    const raw = sine(fs, fs, 997, 1);
    const x = clip(raw, 0.9);
    // Before engine 1.0 measureLevels' |x| ≥ 1 − 2⁻¹⁵ threshold counted 0 clipped samples here.
    const r = detectClipping(x);
    expect(r.clippedSamples).toBe(countAtOrAbove(raw, 0.9));
    // Two flat tops per period: 2·997 in 1 s, ±1 for a partial period at the end (closed form).
    expect(Math.abs(r.clippedRuns - 2 * 997)).toBeLessThanOrEqual(1);
    // Clip duration 2·acos(0.9)/ω = 6.9 samples at 997 Hz/48 kHz (closed form).
    expect(r.longestRun).toBe(7);
  });

  it('finds flat tops in 24-bit and float records, above 1.0 too, and barely clipped peaks', () => {
    const fs = 96000;
    const raw = sine(fs / 2, fs, 997, 1);
    const x24 = pcm(clip(raw, 0.5), 24);
    // Rounding to the nearest 24-bit code also lands values within ½ LSB (2⁻²⁴) below 0.5 on the flat top.
    expect(detectClipping(x24).clippedSamples).toBe(countAtOrAbove(raw, 0.5 - 2 ** -24));
    const hot = sine(fs / 2, fs, 997, 2);
    const float = clip(hot, 1.5);
    const r = detectClipping(float);
    expect(r.clippedSamples).toBe(countAtOrAbove(hot, 1.5));
    expect(r.overFullScaleSamples).toBe(float.filter((v) => Math.abs(v) > 1).length); // |x| > 1 by definition
    expect(r.overFullScaleSamples).toBeGreaterThan(0.6 * hot.length); // |sin| > ½ for 2/3 of the time (closed form)
    // Clipped at 0.99: flat tops of 2·acos(0.99)/ω ≈ 4.3 samples at 997 Hz/96 kHz (closed form).
    const slight = pcm(clip(raw, 0.99), 16);
    const s = detectClipping(slight);
    expect(s.clippedRuns).toBeGreaterThanOrEqual(2 * 997 * 0.5 - 1);
    // The flat top is the code round(0.99·2¹⁵) = 32440; rounding lands every |x|·2¹⁵ ≥ 32439.5 on it.
    expect(s.clippedSamples).toBe(countAtOrAbove(raw, 32439.5 / 32768));
  });

  it('counts nothing in noise, silence or DC', () => {
    expect(detectClipping(pcm(gaussian(48000, 3, 0.1), 16)).clippedSamples).toBe(0);
    expect(detectClipping(new Float64Array(1000))).toMatchObject({ clippedSamples: 0, clippedRuns: 0 });
    expect(detectClipping(new Float64Array(1000).fill(0.5))).toMatchObject({ clippedSamples: 0, clippedRuns: 0, maxValue: 0.5 });
    expect(detectClipping(new Float64Array(0)).clippedSamples).toBe(0);
  });
});
