// Every way decodeRawFloat32 refuses bytes; shared by the decoder's own tests and the check
// that user-facing messages name no internal function.
import type { AudioDecodeErrorCode } from '../../src/io/index.js';

/** Little-endian float32 bytes of `values`. */
export function f32le(values: number[]): Uint8Array {
  const out = new Uint8Array(values.length * 4);
  values.forEach((v, i) => new DataView(out.buffer).setFloat32(i * 4, v, true));
  return out;
}

/** [code, bytes, declared rate and channels, what the message must say]. */
export const RAW_ERROR_CASES: Array<[AudioDecodeErrorCode, Uint8Array, { sampleRate: number; channels: number }, RegExp]> = [
  ['raw-length-mismatch', new Uint8Array(10), { sampleRate: 48000, channels: 1 }, /10 bytes.*4 bytes each/],
  ['raw-length-mismatch', f32le([1, 2, 3]), { sampleRate: 48000, channels: 2 }, /12 bytes.*8 bytes each/],
  ['no-data', new Uint8Array(0), { sampleRate: 48000, channels: 1 }, /empty/],
  ['zero-channels', f32le([1]), { sampleRate: 48000, channels: 0 }, /1 to 8/],
  ['too-many-channels', f32le([1]), { sampleRate: 48000, channels: 9 }, /1 to 8/],
  ['sample-rate-out-of-range', f32le([1]), { sampleRate: 200000, channels: 1 }, /8000–192000/],
  ['invalid-option', f32le([1]), { sampleRate: 44100.5, channels: 1 }, /whole numbers/],
  ['non-finite-sample', f32le([0, Number.NEGATIVE_INFINITY]), { sampleRate: 48000, channels: 1 }, /^Sample 1 of channel 1 is -Infinity/],
];
