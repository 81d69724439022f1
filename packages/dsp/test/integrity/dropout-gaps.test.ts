import { describe, expect, it } from 'vitest';
import { detectDropoutGaps } from '../../src/measures/dropout-gaps.js';
import { applyFades } from '../../src/stimulus/fade.js';
import { pinkNoise } from '../../src/stimulus/pink-noise.js';
import { createSeededRandom } from '../../src/stimulus/seeded-random.js';
import { gaussian, sine } from '../helpers/signals.js';
import { add, tpdfDither } from '../timing/timing-signals.js';

const RATES = [44100, 48000, 96000, 192000];

/** A capture: 50 ms of dithered idle noise (latency), a faded tone, 50 ms of trailing silence. */
function capture(fs: number, f: number, amplitude: number, seconds: number): Float64Array {
  const tone = sine(Math.round(seconds * fs), fs, f, amplitude);
  applyFades(tone, Math.round(0.01 * fs), Math.round(0.01 * fs));
  const lead = Math.round(0.05 * fs);
  const x = new Float64Array(tone.length + 2 * lead);
  x.set(tone, lead);
  return add(x, tpdfDither(x.length, 24, 17));
}

describe('detectDropoutGaps', () => {
  it.each(RATES)('finds a 5 ms gap down to a −140 dBFS floor in a −20 dBFS tone at %i Hz (old rule: only digital zero)', (fs) => {
    const x = capture(fs, 997, 0.1, 0.5);
    const start = Math.round(0.2 * fs);
    const length = Math.round(0.005 * fs);
    x.set(tpdfDither(length, 24, 3), start); // the path delivered only its idle noise
    // Before engine 1.0 detectDropouts (digital zero only) found no dropout here.
    const gaps = detectDropoutGaps(x, fs);
    expect(gaps.length).toBe(1);
    // The gap's ends are refined to the sample; the tone may cross zero right at an edge, adding a sample.
    expect(Math.abs((gaps[0]?.startSample as number) - start)).toBeLessThanOrEqual(2);
    expect(Math.abs((gaps[0]?.lengthSamples as number) - length)).toBeLessThanOrEqual(3);
    // TPDF peak ≤ 1 LSB = 2⁻²³ against a 0.1 peak: ≤ 20·log10(2⁻²³/0.1) = −118.4 dB (closed form).
    expect(gaps[0]?.depthDb).toBeLessThan(-118);
  });

  it('finds a run of digital zero like the old rule, with its exact position', () => {
    const fs = 48000;
    const x = sine(fs, fs, 440, 0.5);
    x.fill(0, 0, 1000); // lead-in latency: touches the record's start, so not a dropout
    x.fill(0, 20000, 20240); // 240 samples = 5 ms
    const gaps = detectDropoutGaps(x, fs);
    // Exactly the zeroed run (by construction); the old detectDropouts found the same [20000, 240].
    // Its neighbours are far from zero: 0.5·sin(2π·440·20000/48000) = 0.433 and
    // 0.5·sin(2π·440·20240/48000) = −0.104, above the −40 dB threshold 0.005 (closed form).
    expect(gaps.map((g) => [g.startSample, g.lengthSamples])).toEqual([[20000, 240]]);
    expect(gaps[0]?.depthDb).toBe(-Infinity);
  });

  it.each(RATES)('ignores lead-in latency, trailing silence, fades and quiet-on-purpose signals at %i Hz', (fs) => {
    expect(detectDropoutGaps(capture(fs, 997, 0.5, 0.3), fs)).toEqual([]);
    expect(detectDropoutGaps(capture(fs, 997, 0.001, 0.3), fs)).toEqual([]); // a −60 dBFS tone
    expect(detectDropoutGaps(capture(fs, 20, 0.5, 0.3), fs)).toEqual([]); // slow zero crossings
    // Fade-out, 50 ms of idle noise, fade-in: a pause on purpose with gradual edges.
    const a = capture(fs, 997, 0.5, 0.2);
    const twice = new Float64Array(2 * a.length);
    twice.set(a);
    twice.set(a, a.length);
    expect(detectDropoutGaps(twice, fs)).toEqual([]);
    expect(detectDropoutGaps(gaussian(Math.round(0.3 * fs), 1, 0.1), fs)).toEqual([]);
    expect(detectDropoutGaps(pinkNoise(Math.round(0.3 * fs), fs, 0.1, createSeededRandom(2)), fs)).toEqual([]);
  });

  it('handles silence and DC', () => {
    expect(detectDropoutGaps(new Float64Array(48000), 48000)).toEqual([]);
    expect(detectDropoutGaps(new Float64Array(48000).fill(0.5), 48000)).toEqual([]);
    expect(detectDropoutGaps(new Float64Array(0), 48000)).toEqual([]);
  });
});
