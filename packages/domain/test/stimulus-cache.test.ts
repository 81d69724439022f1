import { StimulusSpec } from '@earmark/contracts';
import { stimulusAsPlayed } from '@earmark/dsp';
import { describe, expect, it } from 'vitest';
import { StimulusCache, stimulusSpecHash } from '../src/judging/stimulus-cache.js';

const sine = (seconds: number) => StimulusSpec.parse({ kind: 'sine', sampleRate: 8000, seconds, frequency: 1000, levelDbfs: -12 });

/** A cache over the real builder that records which specs it had to build. */
function counting(maxSamples: number) {
  const built: number[] = [];
  const cache = new StimulusCache(maxSamples, (spec) => {
    built.push(spec.seconds);
    return stimulusAsPlayed(spec);
  });
  return { cache, built };
}

describe('the stimulus cache', () => {
  it('builds a spec once and serves the same arrays after', () => {
    const { cache, built } = counting(100_000);
    const first = cache.get(sine(1));
    const again = cache.get(sine(1));
    expect([first.cached, again.cached]).toEqual([false, true]);
    expect(again.stimulus).toBe(first.stimulus);
    expect(built).toEqual([1]);
    expect(cache.counts).toEqual({ builds: 1, hits: 1 });
  });

  it('evicts the least recently used spec once the samples held pass the bound', () => {
    // 1 s, 2 s and 3 s at 8 kHz: 8,000 + 16,000 + 24,000 samples; the bound holds 40,000.
    const { cache, built } = counting(40_000);
    cache.get(sine(1));
    cache.get(sine(2));
    cache.get(sine(1)); // 1 s is now the most recently used
    cache.get(sine(3)); // 48,000 held: the 2 s stimulus goes
    expect(cache.samples).toBe(32_000);
    cache.get(sine(1));
    cache.get(sine(3));
    cache.get(sine(2));
    expect(built).toEqual([1, 2, 3, 2]);
  });

  it('does not keep a stimulus larger than the whole bound', () => {
    const { cache, built } = counting(4_000);
    cache.get(sine(1));
    cache.get(sine(1));
    expect(built).toEqual([1, 1]);
    expect(cache.samples).toBe(0);
  });

  it('keys a spec by its content, not by how it was written', () => {
    const written = { levelDbfs: -12, frequency: 1000, seconds: 1, sampleRate: 8000, kind: 'sine' } as StimulusSpec;
    expect(stimulusSpecHash(written)).toBe(stimulusSpecHash(sine(1)));
    expect(stimulusSpecHash(sine(2))).not.toBe(stimulusSpecHash(sine(1)));
    expect(stimulusSpecHash(sine(1))).toMatch(/^[0-9a-f]{64}$/);
  });
});
