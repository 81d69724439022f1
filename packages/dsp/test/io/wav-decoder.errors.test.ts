// Every way decodeWav refuses a file, each built by damaging exactly one thing in an
// otherwise valid RIFF/WAVE layout (Microsoft RIFF/WAVE and WAVEFORMATEXTENSIBLE layout).
import { describe, expect, it } from 'vitest';
import { AudioDecodeError, decodeWav, type AudioDecodeErrorCode } from '../../src/io/index.js';
import { chunk, extensibleFmtBody, float32Body, fmtBody, int16Body, riff } from './riff-builder.js';

function decodeError(bytes: Uint8Array): AudioDecodeError {
  try {
    decodeWav(bytes);
  } catch (e) {
    if (e instanceof AudioDecodeError) return e;
    throw e;
  }
  throw new Error('decodeWav accepted the file');
}

const fourFrames = int16Body([1, -1, 2, -2]);
const valid = riff([chunk('fmt ', fmtBody()), chunk('data', fourFrames)]);

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

const cases: Array<[AudioDecodeErrorCode, string, Uint8Array, RegExp]> = [
  ['not-riff', 'an MP3/ID3 header', new TextEncoder().encode('ID3\u0004\u0000\u0000\u0000\u0000\u0000\u0000\u0000\u0000\u0000'), /not a WAV file/],
  ['not-riff', 'an RF64 file', riff([chunk('fmt ', fmtBody())], 'RF64'), /RF64/],
  ['not-riff', 'a RIFF file of another form (AVI)', riff([], 'RIFF', 'AVI '), /not a WAV file/],
  ['not-riff', 'fewer than 12 bytes', new TextEncoder().encode('RIFF'), /not a WAV file/],
  ['truncated', 'a file cut inside the fmt chunk', valid.slice(0, 30), /truncated/],
  ['truncated', 'a fmt chunk shorter than 16 bytes', riff([chunk('fmt ', fmtBody().slice(0, 14)), chunk('data', fourFrames)]), /cut short/],
  ['truncated', 'an extensible fmt chunk shorter than 40 bytes', riff([chunk('fmt ', extensibleFmtBody().slice(0, 24)), chunk('data', fourFrames)]), /40 bytes/],
  ['no-format', 'no fmt chunk at all', riff([chunk('LIST', new Uint8Array(24)), chunk('data', fourFrames)]), /no "fmt " chunk/],
  ['duplicate-chunk', 'two data chunks', riff([chunk('fmt ', fmtBody()), chunk('data', fourFrames), chunk('data', fourFrames)]), /more than one "data"/],
  ['unsupported-format', 'μ-law (format tag 7)', riff([chunk('fmt ', fmtBody({ tag: 7, bits: 8 })), chunk('data', fourFrames)]), /0x0007/],
  ['unsupported-format', 'MP3 in WAV (tag 0x55)', riff([chunk('fmt ', fmtBody({ tag: 0x55 })), chunk('data', fourFrames)]), /0x0055.*accepts/],
  ['unsupported-format', 'extensible with an A-law sub-format', riff([chunk('fmt ', extensibleFmtBody({ subFormat: 6 })), chunk('data', fourFrames)]), /sub-format/],
  ['unsupported-format', 'extensible with a foreign GUID tail', riff([chunk('fmt ', extensibleFmtBody({ guidTail: new Array<number>(12).fill(7) })), chunk('data', fourFrames)]), /sub-format/],
  ['unsupported-format', 'extensible with more valid bits than the container', riff([chunk('fmt ', extensibleFmtBody({ bits: 16, validBits: 20 })), chunk('data', fourFrames)]), /valid bits/],
  ['unsupported-bit-depth', '12-bit PCM', riff([chunk('fmt ', fmtBody({ bits: 12, blockAlign: 2 })), chunk('data', fourFrames)]), /8, 16, 24 or 32/],
  ['unsupported-bit-depth', '16-bit float', riff([chunk('fmt ', fmtBody({ tag: 3, bits: 16 })), chunk('data', fourFrames)]), /32 or 64/],
  ['zero-channels', '0 channels', riff([chunk('fmt ', fmtBody({ channels: 0, blockAlign: 2 })), chunk('data', fourFrames)]), /0 channels/],
  ['too-many-channels', '9 channels', riff([chunk('fmt ', fmtBody({ channels: 9 })), chunk('data', new Uint8Array(18))]), /9 channels.*1 to 8/],
  ['block-align-mismatch', 'stereo 16-bit with block align 2', riff([chunk('fmt ', fmtBody({ channels: 2, blockAlign: 2 })), chunk('data', fourFrames)]), /block align of 4/],
  ['sample-rate-out-of-range', '4 kHz', riff([chunk('fmt ', fmtBody({ rate: 4000 })), chunk('data', fourFrames)]), /4000 Hz.*8000–192000/],
  ['sample-rate-out-of-range', '384 kHz', riff([chunk('fmt ', fmtBody({ rate: 384000 })), chunk('data', fourFrames)]), /384000 Hz/],
  ['data-exceeds-file', 'a data chunk declaring more bytes than follow', riff([chunk('fmt ', fmtBody()), chunk('data', fourFrames, 1000)]), /declares 1000 bytes but only 8/],
  ['no-data', 'no data chunk', riff([chunk('fmt ', fmtBody()), chunk('LIST', new Uint8Array(4))]), /no "data" chunk/],
  ['no-data', 'an empty data chunk', riff([chunk('fmt ', fmtBody()), chunk('data', new Uint8Array(0))]), /empty/],
  ['partial-frame', 'a data chunk ending mid-frame', riff([chunk('fmt ', fmtBody({ channels: 2 })), chunk('data', int16Body([1, 2, 3]))]), /not a whole number of 4-byte frames/],
  ['non-finite-sample', 'a NaN in float32', riff([chunk('fmt ', fmtBody({ tag: 3, bits: 32 })), chunk('data', float32Body([0, 0.5, Number.NaN]))]), /sample 2 of channel 1 is NaN/],
  ['non-finite-sample', '+Infinity in channel 2', riff([chunk('fmt ', fmtBody({ tag: 3, bits: 32, channels: 2 })), chunk('data', float32Body([0, 0.5, 0.25, Number.POSITIVE_INFINITY]))]), /sample 1 of channel 2 is Infinity/],
];

describe('decodeWav errors: a typed code and a message that says what was wrong', () => {
  it.each(cases)('%s: %s', (code, _what, bytes, message) => {
    const error = decodeError(bytes);
    expect(error.code).toBe(code);
    expect(error.name).toBe('AudioDecodeError');
    expect(error.message).toMatch(/^(decodeWav|readRiffChunks): /);
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
