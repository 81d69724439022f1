// Bounds on hostile captures: chunk count and decoded sample count are refused from the
// header, before the decoder walks millions of chunks or allocates gigabytes.
import { describe, expect, it } from 'vitest';
import {
  AudioDecodeError,
  MAX_DECODED_SAMPLES,
  MAX_RIFF_CHUNKS,
  decodeCapture,
  decodeRawFloat32,
  decodeWav,
} from '../../src/io/index.js';
import { chunk, fmtBody, int16Body, riff } from './riff-builder.js';

function refusal(run: () => unknown): AudioDecodeError {
  try {
    run();
  } catch (e) {
    if (e instanceof AudioDecodeError) return e;
    throw e;
  }
  throw new Error('the decoder accepted the input');
}

const twoFrames = int16Body([100, -100]);

/** fmt + `junk` empty JUNK chunks + data. */
function withJunk(junk: number): Uint8Array {
  return riff([chunk('fmt ', fmtBody()), ...Array.from({ length: junk }, () => chunk('JUNK', new Uint8Array(0))), chunk('data', twoFrames)]);
}

/** Raw WAV bytes: fmt, then `junk` empty JUNK chunks written in place (8 bytes each), then data. */
function manyEmptyChunks(junk: number): Uint8Array {
  const head = riff([chunk('fmt ', fmtBody())]);
  const tail = chunk('data', twoFrames);
  const out = new Uint8Array(head.length + junk * 8 + tail.length);
  out.set(head);
  const id = [0x4a, 0x55, 0x4e, 0x4b]; // "JUNK", size 0
  for (let i = 0, at = head.length; i < junk; i++, at += 8) out.set(id, at);
  out.set(tail, head.length + junk * 8);
  return out;
}

describe('RIFF chunk count bound', () => {
  it('is 64 chunks', () => {
    expect(MAX_RIFF_CHUNKS).toBe(64);
  });

  it('a file of exactly 64 chunks decodes', () => {
    const d = decodeWav(withJunk(62));
    expect(d.frames).toBe(2);
    expect(Array.from(d.channels[0] ?? [])).toEqual([100 / 32768, -100 / 32768]);
  });

  it('a file of 65 chunks is refused with too-many-chunks', () => {
    const error = refusal(() => decodeWav(withJunk(63)));
    expect(error.code).toBe('too-many-chunks');
    expect(error.message).toBe(
      'The WAV file holds more than 64 chunks (the next one starts at byte 540); Earmark reads WAV files of at most 64 chunks. Re-export the capture without padding or metadata chunks.',
    );
  });

  it('chunks after the data chunk count too', () => {
    const bytes = riff([chunk('fmt ', fmtBody()), chunk('data', twoFrames), ...Array.from({ length: 63 }, () => chunk('JUNK', new Uint8Array(0)))]);
    expect(refusal(() => decodeWav(bytes)).code).toBe('too-many-chunks');
  });

  it('two million empty JUNK chunks are refused without walking them', () => {
    const bytes = manyEmptyChunks(2_000_000);
    const started = performance.now();
    const error = refusal(() => decodeWav(bytes));
    const elapsed = performance.now() - started;
    expect(error.code).toBe('too-many-chunks');
    // Walking all of them took ~1 s before the bound; 64 headers take microseconds (the margin is for
    // a garbage-collection pause on a busy machine).
    expect(elapsed).toBeLessThan(250);
  });
});

describe('decoded sample bound (frames × channels, checked before allocating)', () => {
  it('is 2^25 samples (256 MiB as Float64)', () => {
    expect(MAX_DECODED_SAMPLES).toBe(33_554_432);
  });

  it('a WAV header claiming exactly 2^25 samples passes the bound (and is then found truncated)', () => {
    // 2^24 stereo 16-bit frames claimed, 2 frames present: the sample bound lets it through.
    const bytes = riff([chunk('fmt ', fmtBody({ channels: 2 })), chunk('data', int16Body([1, 2, 3, 4]), 2 ** 24 * 4)]);
    expect(refusal(() => decodeWav(bytes)).code).toBe('data-exceeds-file');
  });

  it('a WAV header claiming 2^25 + 1 samples is refused, naming the count and the limit', () => {
    // 8-bit mono: one byte per sample, so the claimed size is the sample count.
    const bytes = riff([chunk('fmt ', fmtBody({ bits: 8 })), chunk('data', new Uint8Array(4), 2 ** 25 + 1)]);
    const error = refusal(() => decodeWav(bytes));
    expect(error.code).toBe('too-many-samples');
    expect(error.message).toBe(
      'The capture holds 33,554,433 samples (33,554,433 frames × 1 channel(s)); Earmark analyses at most 33,554,432 samples per capture. Upload a shorter capture or fewer channels.',
    );
  });

  it('a 64 MiB 8-bit mono WAV (67 M samples) is refused, also when read back as a stored capture', () => {
    const bytes = riff([chunk('fmt ', fmtBody({ bits: 8 })), chunk('data', new Uint8Array(4), 64 * 1024 * 1024)]);
    expect(refusal(() => decodeWav(bytes)).message).toMatch(/^The capture holds 67,108,864 samples .*at most 33,554,432/);
    expect(refusal(() => decodeCapture(bytes, { container: 'wav', sampleRate: 48000, channels: 1 })).code).toBe('too-many-samples');
  });

  it('with a smaller limit, a WAV exactly at the limit decodes and one sample over is refused', () => {
    const stereo = riff([chunk('fmt ', fmtBody({ channels: 2 })), chunk('data', int16Body([1, 2, 3, 4]))]);
    expect(decodeWav(stereo, { maxSamples: 4 }).frames).toBe(2);
    const error = refusal(() => decodeWav(stereo, { maxSamples: 3 }));
    expect(error.code).toBe('too-many-samples');
    expect(error.message).toMatch(/^The capture holds 4 samples \(2 frames × 2 channel\(s\)\); Earmark analyses at most 3 samples/);
  });

  it('raw float32: exactly at the limit decodes, one frame over is refused', () => {
    const sixSamples = new Uint8Array(6 * 4);
    expect(decodeRawFloat32(sixSamples, { sampleRate: 48000, channels: 2 }, { maxSamples: 6 }).frames).toBe(3);
    const error = refusal(() => decodeRawFloat32(new Uint8Array(8 * 4), { sampleRate: 48000, channels: 2 }, { maxSamples: 6 }));
    expect(error.code).toBe('too-many-samples');
    expect(error.message).toMatch(/^The capture holds 8 samples \(4 frames × 2 channel\(s\)\); Earmark analyses at most 6 samples/);
  });

  it('raw float32 of 2^25 + 1 samples is refused at the default limit before decoding', () => {
    // 128 MiB of zero bytes the decoder never reads (the pages stay untouched).
    const bytes = new Uint8Array((2 ** 25 + 1) * 4);
    const error = refusal(() => decodeRawFloat32(bytes, { sampleRate: 48000, channels: 1 }));
    expect(error.code).toBe('too-many-samples');
    expect(error.message).toMatch(/^The capture holds 33,554,433 samples .*at most 33,554,432 samples/);
  });
});
