import { describe, expect, it } from 'vitest';
import { measureClockDrift } from '../../src/timing/clock-drift.js';
import { bandLimitedNoise, resampleWithDrift } from './timing-signals.js';

describe('measureClockDrift', () => {
  const fs = 48000;
  // 10 s of noise band-limited to 20 kHz (so the sinc resampler in the test is accurate).
  const x = bandLimitedNoise(10 * fs, fs, 20000, 0.1, 21);

  it('reads +50 ppm as 50 ± 2 ppm on 10 s of noise at 48 kHz', () => {
    const y = resampleWithDrift(x, 50, 300.4, x.length + 2000);
    const drift = measureClockDrift(x, y, fs);
    expect(drift).not.toBeNull();
    // Latency grows by 50e-6 per stimulus sample (definition of the drift), 50 ppm by construction.
    expect(Math.abs((drift?.ppm as number) - 50)).toBeLessThan(2);
  });

  it('reads 0 ± 1 ppm without drift', () => {
    const y = resampleWithDrift(x, 0, 300.4, x.length + 2000);
    const drift = measureClockDrift(x, y, fs);
    expect(Math.abs(drift?.ppm as number)).toBeLessThan(1);
  });

  it('returns null for a short record or a silent one', () => {
    const short = x.subarray(0, fs);
    expect(measureClockDrift(short, short, fs)).toBeNull();
    const silent = new Float64Array(5 * fs);
    expect(measureClockDrift(silent, silent, fs)).toBeNull();
  });
});
