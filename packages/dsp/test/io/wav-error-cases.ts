// Every way decodeWav refuses a file, each built by damaging exactly one thing in an otherwise
// valid RIFF/WAVE layout (Microsoft RIFF/WAVE and WAVEFORMATEXTENSIBLE layout). Shared by the
// decoder's own tests and the check that user-facing messages name no internal function.
import type { AudioDecodeErrorCode } from '../../src/io/index.js';
import { chunk, extensibleFmtBody, float32Body, fmtBody, int16Body, riff } from './riff-builder.js';

export const fourFrames = int16Body([1, -1, 2, -2]);
export const valid = riff([chunk('fmt ', fmtBody()), chunk('data', fourFrames)]);

/** [code, what was damaged, bytes, what the message must say]. */
export const WAV_ERROR_CASES: Array<[AudioDecodeErrorCode, string, Uint8Array, RegExp]> = [
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
  ['too-many-chunks', '65 chunks (63 empty JUNK chunks between fmt and data)', riff([chunk('fmt ', fmtBody()), ...Array.from({ length: 63 }, () => chunk('JUNK', new Uint8Array(0))), chunk('data', fourFrames)]), /more than 64 chunks/],
  ['too-many-samples', 'a 16-bit stereo data chunk claiming 2^24 + 1 frames (2^25 + 2 samples)', riff([chunk('fmt ', fmtBody({ channels: 2 })), chunk('data', fourFrames, (2 ** 24 + 1) * 4)]), /33,554,434 samples.*at most 33,554,432/],
  ['non-finite-sample', 'a NaN in float32', riff([chunk('fmt ', fmtBody({ tag: 3, bits: 32 })), chunk('data', float32Body([0, 0.5, Number.NaN]))]), /^Sample 2 of channel 1 is NaN/],
  ['non-finite-sample', '+Infinity in channel 2', riff([chunk('fmt ', fmtBody({ tag: 3, bits: 32, channels: 2 })), chunk('data', float32Body([0, 0.5, 0.25, Number.POSITIVE_INFINITY]))]), /^Sample 1 of channel 2 is Infinity/],
];
