import { describe, expect, it } from 'vitest';
import { estimateLatency } from '../../src/transfer/fft-convolution.js';
import { interChannelDelay, interChannelDelays } from '../../src/timing/inter-channel.js';
import { add, fadedSweep, fractionalDelay, tpdfDither } from './timing-signals.js';

describe('interChannelDelay', () => {
  it.each([
    [44100, 0.5],
    [48000, 0.25],
    [96000, 0.5],
    [192000, 0.25],
  ])('reads a %i Hz skew of %f samples within ±0.02 (the whole-sample peak read 0)', (fs, skew) => {
    const a = add(fractionalDelay(fadedSweep(fs, 20, 20000, 0.5, 0.5), 100), tpdfDither(Math.round(0.5 * fs) + 100, 24, 1));
    const b = add(fractionalDelay(fadedSweep(fs, 20, 20000, 0.5, 0.5), 100 + skew, a.length), tpdfDither(a.length, 24, 2));
    // Old reading: whole samples only, so a 0.5 or 0.25 skew reads 0 (or 1 on a tie), never the skew.
    const old = estimateLatency(a, b, 100);
    expect(Math.abs(old - skew)).toBeGreaterThanOrEqual(0.25);
    const d = interChannelDelay(a, b);
    expect(Math.abs(d.samples - skew)).toBeLessThan(0.02); // shift theorem: exactly `skew`
    expect(d.polarity).toBe('normal');
  });

  it('shows the delay and polarity of an inverted and delayed channel among 8', () => {
    const fs = 48000;
    const x = fadedSweep(fs, 20, 20000, 0.5, 0.5);
    const delays = [0, 0, 0.5, 3, 7.25, 0, 12, 1];
    const channels = delays.map((d, c) => {
      const y = fractionalDelay(x, 50 + d, x.length + 100);
      return c === 3 || c === 5 ? y.map((v) => -v) : y;
    });
    const result = interChannelDelays(channels);
    result.forEach((r, c) => {
      expect(Math.abs(r.samples - (delays[c] as number))).toBeLessThan(0.02); // shift theorem
      expect(r.polarity).toBe(c === 3 || c === 5 ? 'inverted' : 'normal');
    });
  });

  it('copes with silence and DC', () => {
    const a = fadedSweep(48000, 20, 20000, 0.1, 0.5);
    const silent = interChannelDelay(a, new Float64Array(a.length));
    expect(silent.samples).toBe(0);
    expect(silent.warnings.join(' ')).toMatch(/silent/);
    const dc = interChannelDelay(a, new Float64Array(a.length).fill(0.1));
    expect(Number.isFinite(dc.samples)).toBe(true);
    expect(dc.confidence).toBeLessThan(0.1); // a constant is uncorrelated with a zero-mean sweep
  });
});
