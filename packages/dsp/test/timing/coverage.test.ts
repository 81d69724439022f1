import { describe, expect, it } from 'vitest';
import { checkStimulusCoverage } from '../../src/timing/coverage.js';
import { refusedBy } from '../helpers/refused.js';

describe('checkStimulusCoverage', () => {
  it('warns when 1 s of latency pushes the end of the stimulus out of the capture', () => {
    // 10 s stimulus, 10 s capture, 1 s latency at 48 kHz: the last 48000 samples are missing (closed form).
    const c = checkStimulusCoverage({ stimulusLength: 480000, captureLength: 480000, latencySamples: 48000, sampleRate: 48000 });
    expect(c.covered).toBe(false);
    expect(c.missingAtEnd).toBe(48000);
    expect(c.missingAtStart).toBe(0);
    expect(c.warning).toMatch(/48000 samples \(1\.000 s\)/);
  });

  it('accepts an exact fit, rounds fractional latency up, and counts a late start and a tail', () => {
    expect(checkStimulusCoverage({ stimulusLength: 1000, captureLength: 1100, latencySamples: 100 })).toEqual({ covered: true, missingAtStart: 0, missingAtEnd: 0, warning: null });
    expect(checkStimulusCoverage({ stimulusLength: 1000, captureLength: 1100, latencySamples: 100.3 }).missingAtEnd).toBe(1); // ⌈0.3⌉
    expect(checkStimulusCoverage({ stimulusLength: 1000, captureLength: 1100, latencySamples: -20 }).missingAtStart).toBe(20);
    expect(checkStimulusCoverage({ stimulusLength: 1000, captureLength: 1100, latencySamples: 100, tailSamples: 50 }).missingAtEnd).toBe(50);
    expect(checkStimulusCoverage({ stimulusLength: 0, captureLength: 0, latencySamples: 0 }).covered).toBe(true);
    expect(() => checkStimulusCoverage({ stimulusLength: -1, captureLength: 0, latencySamples: 0 })).toThrow(refusedBy('checkStimulusCoverage'));
  });
});
