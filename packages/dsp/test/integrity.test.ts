import { describe, expect, it } from 'vitest';
import { detectDropoutGaps } from '../src/measures/dropout-gaps.js';
import { detectGlitches } from '../src/measures/glitches.js';
import { gaussian, sine } from './helpers/signals.js';

describe('dropouts and discontinuities', () => {
  it('finds a 5 ms run of digital silence inside a tone, not the silent lead-in', () => {
    const fs = 48000;
    const x = sine(48000, fs, 440, 0.5);
    x.fill(0, 0, 1000); // lead-in latency: not a dropout
    x.fill(0, 20000, 20240); // 240 samples = 5 ms
    const gaps = detectDropoutGaps(x, fs);
    // Exactly the zeroed run (by construction): digital zero lies −∞ dB below the tone.
    expect(gaps.map((g) => ({ startSample: g.startSample, lengthSamples: g.lengthSamples }))).toEqual([{ startSample: 20000, lengthSamples: 240 }]);
    expect(gaps[0]?.depthDb).toBe(-Infinity);
  });
  it('flags a step in a sine and a skipped block, not clean tones or white noise', () => {
    const fs = 48000;
    const clean = sine(48000, fs, 997, 0.9);
    expect(detectGlitches(clean, fs)).toEqual([]);
    expect(detectGlitches(gaussian(48000, 2, 0.3), fs)).toEqual([]);
    // A 0.05 FS step at 24000: the predictor's residual jumps on the step's own sample.
    const step = sine(48000, fs, 997, 0.9);
    for (let i = 24000; i < step.length; i++) step[i] = (step[i] as number) + 0.05;
    expect(detectGlitches(step, fs).map((e) => e.sample)).toEqual([24000]);
    const broken = sine(48000, fs, 997, 0.9);
    // Drop 17 samples at 30000 (a lost block): the waveform jumps in phase there.
    const spliced = new Float64Array(48000 - 17);
    spliced.set(broken.subarray(0, 30000));
    spliced.set(broken.subarray(30017), 30000);
    const events = detectGlitches(spliced, fs);
    expect(events.length).toBe(1);
    expect(Math.abs((events[0]?.sample as number) - 30000)).toBeLessThanOrEqual(2);
  });
});
