import { describe, expect, it } from 'vitest';
import { MAX_STIMULUS_SAMPLES, StimulusSpec, stimulusSampleCount } from '../src/stimulus.js';

function issues(input: unknown): Array<{ path: PropertyKey[]; message: string }> {
  const result = StimulusSpec.safeParse(input);
  return result.success ? [] : result.error.issues.map(({ path, message }) => ({ path, message }));
}

describe('stimulus sample budget (seconds × sampleRate × channels)', () => {
  it('is 2^24 samples', () => {
    expect(MAX_STIMULUS_SAMPLES).toBe(16_777_216);
  });

  it('a stimulus of exactly 2^24 samples is accepted (8 channels × 2^21 frames at 192 kHz)', () => {
    const spec = { kind: 'white-noise', sampleRate: 192000, channels: 8, seconds: 2 ** 21 / 192000 };
    expect(issues(spec)).toEqual([]);
    expect(stimulusSampleCount(StimulusSpec.parse(spec) as { seconds: number; sampleRate: number; channels: number })).toBe(2 ** 24);
  });

  it('one frame more is refused on seconds, naming the count and the limit', () => {
    const spec = { kind: 'white-noise', sampleRate: 192000, channels: 8, seconds: (2 ** 21 + 1) / 192000 };
    expect(issues(spec)).toEqual([
      {
        path: ['seconds'],
        message:
          'the stimulus would render 16,777,224 samples (seconds × sampleRate × channels); at most 16,777,216 are allowed — shorten it or use fewer channels',
      },
    ]);
  });

  it('refuses the 60 s × 192 kHz × 8-channel sine that once cost 1 GB to download', () => {
    expect(issues({ kind: 'sine', sampleRate: 192000, channels: 8, seconds: 60, frequency: 1000 })[0]?.message).toMatch(
      /^the stimulus would render 92,160,000 samples/,
    );
  });

  it("counts a sweep's trailing silence", () => {
    const sweep = { kind: 'sweep', sampleRate: 48000, from: 20, to: 20000, seconds: 300 };
    expect(issues({ ...sweep, silenceSeconds: 49 })).toEqual([]); // 349 s × 48 kHz = 16,752,000
    expect(issues({ ...sweep, silenceSeconds: 50 })[0]?.message).toMatch(/^the stimulus would render 16,800,000 samples/);
  });

  it.each(['sine', 'multitone', 'impulse', 'pink-noise', 'silence', 'imd-smpte', 'imd-twin-tone'])('applies to %s', (kind) => {
    const extra: Record<string, unknown> = { sine: { frequency: 1000 }, multitone: { frequencies: [1000] } };
    const spec = { kind, sampleRate: 192000, channels: 2, seconds: 50, ...(extra[kind] as object | undefined) };
    expect(issues(spec).map((i) => i.message)).toContain(
      'the stimulus would render 19,200,000 samples (seconds × sampleRate × channels); at most 16,777,216 are allowed — shorten it or use fewer channels',
    );
  });
});
