// Every way decodeWav refuses a file, each built by damaging exactly one thing in an
// otherwise valid RIFF/WAVE layout (Microsoft RIFF/WAVE and WAVEFORMATEXTENSIBLE layout).
import { describe, expect, it } from 'vitest';
import { AudioDecodeError, decodeWav, type AudioDecodeErrorCode } from '../../src/io/index.js';
import { chunk, extensibleFmtBody, fmtBody, riff } from './riff-builder.js';
import { WAV_ERROR_CASES as cases, fourFrames, valid } from './wav-error-cases.js';

function decodeError(bytes: Uint8Array): AudioDecodeError {
  try {
    decodeWav(bytes);
  } catch (e) {
    if (e instanceof AudioDecodeError) return e;
    throw e;
  }
  throw new Error('decodeWav accepted the file');
}


describe('decodeWav accepts what the errors below are variations of', () => {
  it('a valid 16-bit mono file decodes', () => {
    const d = decodeWav(valid);
    expect(Array.from(d.channels[0] ?? [])).toEqual([1 / 32768, -1 / 32768, 2 / 32768, -2 / 32768]);
  });

  it('the fmt chunk may come after the data chunk (chunks in any order)', () => {
    const d = decodeWav(riff([chunk('data', fourFrames), chunk('fmt ', fmtBody())]));
    expect(d.frames).toBe(4);
  });

  it('ignores a wrong RIFF size field and a stray byte after the last chunk', () => {
    const bytes = new Uint8Array(valid.length + 1);
    bytes.set(valid);
    new DataView(bytes.buffer).setUint32(4, 12345, true);
    expect(decodeWav(bytes).frames).toBe(4);
  });

  it('reads a 20-bit-valid extensible file by its 24-bit container', () => {
    const body = new Uint8Array([0x00, 0x00, 0x80]); // −2^23 in a 24-bit container
    const d = decodeWav(riff([chunk('fmt ', extensibleFmtBody({ bits: 24, validBits: 20 })), chunk('data', body)]));
    expect(d.channels[0]?.[0]).toBe(-1);
    expect(d.format.validBitsPerSample).toBe(20);
  });
});


describe('decodeWav errors: a typed code and a message that says what was wrong', () => {
  it.each(cases)('%s: %s', (code, _what, bytes, message) => {
    const error = decodeError(bytes);
    expect(error.code).toBe(code);
    expect(error.name).toBe('AudioDecodeError');
    // A sentence for the uploader: it reaches them as the problem detail of a refused upload.
    expect(error.message).toMatch(/^[A-Z]/);
    expect(error.message).not.toMatch(/decodeWav|readRiffChunks/);
    expect(error.message).toMatch(message);
  });

  it('tests every error code decodeWav can raise', () => {
    const codes = new Set(cases.map(([code]) => code));
    for (const code of [
      'not-riff', 'truncated', 'no-format', 'duplicate-chunk', 'unsupported-format', 'unsupported-bit-depth', 'zero-channels',
      'too-many-channels', 'block-align-mismatch', 'sample-rate-out-of-range', 'data-exceeds-file', 'no-data', 'partial-frame',
      'non-finite-sample',
    ] satisfies AudioDecodeErrorCode[]) {
      expect(codes.has(code), code).toBe(true);
    }
  });

  it('refuses input that is not bytes with a TypeError', () => {
    expect(() => decodeWav('RIFF' as unknown as Uint8Array)).toThrow(TypeError);
  });
});
