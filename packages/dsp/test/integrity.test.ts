import { describe, expect, it } from 'vitest';
import { detectDiscontinuities, detectDropouts } from '../src/measures/integrity.js';
import { gaussian, sine } from './helpers/signals.js';

describe('dropouts and discontinuities', () => {
  it('finds a 5 ms run of digital silence inside a tone, not the silent lead-in', () => {
    const fs = 48000;
    const x = sine(48000, fs, 440, 0.5);
    x.fill(0, 0, 1000); // lead-in latency: not a dropout
    x.fill(0, 20000, 20240); // 240 samples = 5 ms
    expect(detectDropouts(x, fs)).toEqual([{ startSample: 20000, lengthSamples: 240 }]);
  });
  it('flags a step in a sine and a skipped block, not clean tones or white noise', () => {
    const fs = 48000;
    const clean = sine(48000, fs, 997, 0.9);
    expect(detectDiscontinuities(clean)).toEqual([]);
    expect(detectDiscontinuities(gaussian(48000, 2, 0.3))).toEqual([]);
    const broken = sine(48000, fs, 997, 0.9);
    // Drop 17 samples at 30000 (a lost block): the waveform jumps in phase there.
    const spliced = new Float64Array(48000 - 17);
    spliced.set(broken.subarray(0, 30000));
    spliced.set(broken.subarray(30017), 30000);
    const flags = detectDiscontinuities(spliced);
    expect(flags.length).toBe(1);
    expect(Math.abs((flags[0] as number) - 30000)).toBeLessThanOrEqual(2);
  });
});
