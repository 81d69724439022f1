import { createTestDatabase } from '@earmark/db/testing';
import { AudioDecodeError, decodeWav, encodeWav } from '@earmark/dsp';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { passingCaptureWav, seedCatalog, shaOf, shortSweepSpec, SOAK_CASE, uploadCapture } from './support/catalog.js';
import { hostileWav } from './support/hostile-wav.js';
import { reliability } from './support/mode.js';
import { startProcessStack, type ProcessStack } from './support/process-stack.js';
import { recordFigures, resetFigures } from './support/results.js';

/**
 * Fuzzed WAVs: valid files of every encoding the encoder writes, mutated by fast-check (bytes
 * overwritten, header words replaced with extreme values, cut short, chunks spliced in or
 * repeated). The decoder must either decode or throw AudioDecodeError, quickly; the upload route
 * must answer 2xx or a 4xx problem+json, never a 5xx, never hang.
 */
const SEED = 20261202;

const tone = (n: number, phase = 0) => Float64Array.from({ length: n }, (_, i) => 0.5 * Math.sin((2 * Math.PI * 997 * i) / 48000 + phase));
const bases: Uint8Array[] = [
  encodeWav([tone(600)], 48000, { encoding: 'pcm-int', bitsPerSample: 16 }),
  encodeWav([tone(600), tone(600, 1)], 48000, { encoding: 'pcm-int', bitsPerSample: 24 }),
  encodeWav([tone(600)], 48000, { encoding: 'float', bitsPerSample: 32 }),
  hostileWav({ totalBytes: 444, bits: 8 }), // 8-bit (the encoder writes none)
  encodeWav([tone(300), tone(300), tone(300)], 48000, { encoding: 'pcm-int', bitsPerSample: 32 }), // extensible header
  encodeWav([tone(300)], 48000, { encoding: 'float', bitsPerSample: 64 }),
];

const extremes = [0, 1, 2, 3, 7, 8, 0x7fffffff, 0x80000000, 0xfffffff8, 0xffffffff, 44, 48000, 192001];
type Mutation =
  | { kind: 'byte'; at: number; value: number }
  | { kind: 'word'; at: number; value: number }
  | { kind: 'truncate'; at: number }
  | { kind: 'splice'; at: number; id: string; size: number }
  | { kind: 'repeat'; from: number; length: number };

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant('byte' as const), at: fc.nat(), value: fc.integer({ min: 0, max: 255 }) }),
  // Header words (sizes, rates, channel counts, block align) are where a decoder trusts its input.
  fc.record({ kind: fc.constant('word' as const), at: fc.integer({ min: 0, max: 80 }), value: fc.oneof(fc.constantFrom(...extremes), fc.nat()) }),
  fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('splice' as const), at: fc.integer({ min: 12, max: 80 }), id: fc.constantFrom('JUNK', 'fmt ', 'data', 'LIST', 'fact', '\0\0\0\0'), size: fc.oneof(fc.constantFrom(...extremes), fc.integer({ min: 0, max: 64 })) }),
  fc.record({ kind: fc.constant('repeat' as const), from: fc.nat(), length: fc.integer({ min: 1, max: 200 }) }),
);

function mutate(base: Uint8Array, mutations: Mutation[]): Uint8Array<ArrayBuffer> {
  let bytes = Uint8Array.from(base);
  for (const m of mutations) {
    const at = (p: number) => (bytes.length === 0 ? 0 : p % bytes.length);
    if (m.kind === 'byte' && bytes.length) bytes[at(m.at)] = m.value;
    if (m.kind === 'word' && bytes.length >= 4) new DataView(bytes.buffer).setUint32(Math.min(m.at, bytes.length - 4), m.value >>> 0, true);
    if (m.kind === 'truncate') bytes = bytes.slice(0, at(m.at));
    if (m.kind === 'splice') {
      const chunk = new Uint8Array(8 + Math.min(m.size, 64));
      for (let i = 0; i < 4; i++) chunk[i] = m.id.charCodeAt(i);
      new DataView(chunk.buffer).setUint32(4, m.size >>> 0, true);
      const p = Math.min(m.at, bytes.length);
      bytes = Uint8Array.from([...bytes.subarray(0, p), ...chunk, ...bytes.subarray(p)]);
    }
    if (m.kind === 'repeat' && bytes.length) {
      const p = at(m.from);
      bytes = Uint8Array.from([...bytes.subarray(0, p + m.length), ...bytes.subarray(p, p + m.length), ...bytes.subarray(p + m.length)]);
    }
  }
  return bytes;
}

const mutationsOf = (files: Uint8Array[]) => fc.tuple(fc.constantFrom(...files.keys()), fc.array(mutation, { minLength: 1, maxLength: 4 })).map(([b, ms]) => mutate(files[b]!, ms));
const fuzzedWav = mutationsOf(bases);

describe(`the WAV decoder on ${reliability.fuzz.decoderRuns} fuzzed files (in-process)`, () => {
  it('decodes or throws AudioDecodeError, each within 250 ms', () => {
    resetFigures('fuzz');
    const outcomes = { decoded: 0, refused: 0 };
    let slowest = 0;
    fc.assert(
      fc.property(fuzzedWav, (wav) => {
        const started = performance.now();
        try {
          const audio = decodeWav(wav);
          expect(audio.channels.every((c) => c.every(Number.isFinite))).toBe(true);
          outcomes.decoded++;
        } catch (error) {
          if (!(error instanceof AudioDecodeError)) throw error;
          expect(error.message.length).toBeGreaterThan(10);
          outcomes.refused++;
        }
        const ms = performance.now() - started;
        slowest = Math.max(slowest, ms);
        expect(ms).toBeLessThan(250);
      }),
      { numRuns: reliability.fuzz.decoderRuns, seed: SEED },
    );
    recordFigures('fuzz', [
      { name: 'fuzzed WAVs through the decoder', value: reliability.fuzz.decoderRuns, unit: '', note: `${outcomes.decoded} decoded, ${outcomes.refused} refused with AudioDecodeError, 0 other errors; seed ${SEED}` },
      { name: 'slowest fuzzed decode', value: Math.round(slowest * 10) / 10, unit: 'ms' },
    ]);
  });
});

describe(`the upload route on ${reliability.fuzz.uploadRuns} fuzzed files`, () => {
  let stack: ProcessStack;
  beforeAll(async () => {
    stack = await startProcessStack({ database: await createTestDatabase() });
    await seedCatalog(stack.orm, stack.fixture);
  });
  afterAll(() => stack?.close());

  it('answers 2xx or a 4xx problem+json to each, never a 5xx, within 10 s', async () => {
    const statuses: Record<number, number> = {};
    // Valid captures of the soak test case (so an unharmed file is accepted), float32 and 16-bit.
    const accepted = passingCaptureWav(shortSweepSpec);
    const audio = decodeWav(accepted);
    const uploadBases = [accepted, encodeWav(audio.channels, audio.sampleRate, { encoding: 'pcm-int', bitsPerSample: 16 })];
    const samples = fc.sample(mutationsOf(uploadBases), { numRuns: reliability.fuzz.uploadRuns, seed: SEED + 1 });
    let n = 0;
    for (const wav of samples) {
      const res = await uploadCapture(stack.url, stack.ciToken, shaOf('f0cc', n++ % 20), wav, { testCase: SOAK_CASE, signal: AbortSignal.timeout(10_000) });
      statuses[res.status] = (statuses[res.status] ?? 0) + 1;
      expect(res.status, res.text).toBeGreaterThanOrEqual(200);
      expect(res.status, res.text).toBeLessThan(500);
      if (res.status >= 400) {
        expect(res.contentType).toMatch(/^application\/problem\+json/);
        expect(JSON.parse(res.text)).toMatchObject({ status: res.status, title: expect.any(String) });
      }
    }
    recordFigures('fuzz', [{ name: 'fuzzed WAVs through the upload route', value: samples.length, unit: '', note: `answers by status: ${JSON.stringify(statuses)}` }]);
    // The API process is still up and answering.
    expect((await fetch(`${stack.url}/api/health`)).status).toBe(200);
  });
});
