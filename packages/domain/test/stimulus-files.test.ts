import { Readable } from 'node:stream';
import { StimulusSpec } from '@earmark/contracts';
import { decodeWav } from '@earmark/dsp';
import { ObjectMissingError, type ObjectStore } from '@earmark/platform';
import { describe, expect, it } from 'vitest';
import { inlineViewsCompute } from '../src/compute/views-compute.js';
import type { ViewsCompute } from '../src/compute/views-tasks.js';
import { StimulusFiles, stimulusKey } from '../src/services/stimulus-files.js';

/** An object store in memory: enough of the real one's contract (missing objects throw ObjectMissingError). */
function memoryStore() {
  const objects = new Map<string, Buffer>();
  const store = {
    async put(key: string, body: Uint8Array) {
      objects.set(key, Buffer.from(body));
    },
    async getStream(key: string) {
      const body = objects.get(key);
      if (!body) throw new ObjectMissingError(`no object ${key}`);
      return { body: Readable.from([body]), size: body.length };
    },
  };
  return { objects, store: store as unknown as ObjectStore };
}

function countingCompute(): { compute: ViewsCompute; runs: string[] } {
  const inline = inlineViewsCompute();
  const runs: string[] = [];
  return { runs, compute: { run: (task, input) => (runs.push(task), inline.run(task, input)) } };
}

const read = async (body: Readable) => {
  const chunks: Buffer[] = [];
  for await (const c of body) chunks.push(c as Buffer);
  return Buffer.concat(chunks);
};

const sine = { kind: 'sine', sampleRate: 48000, seconds: 0.5, frequency: 997 } as const;

describe('stored stimulus files', () => {
  it('names a spec by its content with defaults filled in, whatever order its fields were written in', () => {
    const reordered = JSON.parse('{"frequency":997,"seconds":0.5,"kind":"sine","sampleRate":48000}') as StimulusSpec;
    const explicit = StimulusSpec.parse(sine);
    expect(stimulusKey(reordered)).toBe(stimulusKey(StimulusSpec.parse(sine)));
    // −20 dBFS is the default level: writing it out names the same file.
    expect(stimulusKey(StimulusSpec.parse({ ...sine, levelDbfs: -20 }))).toBe(stimulusKey(explicit));
    expect(stimulusKey(StimulusSpec.parse({ ...sine, frequency: 1000 }))).not.toBe(stimulusKey(explicit));
    expect(stimulusKey(explicit)).toMatch(/^stimuli\/[^/]+\/[0-9a-f]{64}\.wav$/);
  });

  it('generates a spec once, even for concurrent first downloads, then streams the stored WAV', async () => {
    const { store, objects } = memoryStore();
    const { compute, runs } = countingCompute();
    const files = new StimulusFiles(store, compute);
    const spec = StimulusSpec.parse(sine);
    const [a, b] = await Promise.all([files.open(spec), files.open(spec)]);
    expect(runs).toEqual(['renderStimulusWav']);
    expect([...objects.keys()]).toEqual([stimulusKey(spec)]);
    const third = await files.open(spec);
    expect(runs).toHaveLength(1);
    const [first, second, stored] = await Promise.all([read(a.body), read(b.body), read(third.body)]);
    expect(second.equals(first)).toBe(true);
    expect(stored.equals(first)).toBe(true);
    expect(third.size).toBe(first.length);
    // 0.5 s at 48 kHz, 32-bit float as rigs play it.
    const wav = decodeWav(new Uint8Array(stored));
    expect(wav.frames).toBe(24000);
    expect(wav.format).toMatchObject({ encoding: 'float', bitsPerSample: 32 });
  });
});
