import { AudioDecodeError } from './audio-decode-error.js';
import { DEFAULT_DECODE_LIMITS, MAX_CHANNELS, MAX_SAMPLE_RATE, MIN_SAMPLE_RATE, type DecodeLimits } from './audio-limits.js';
import type { DecodedAudio } from './decoded-audio.js';
import { readInterleaved } from './interleaved-reader.js';
import { assertWithinSampleBudget } from './sample-budget.js';
import { WAVE_FORMAT_IEEE_FLOAT } from './wav-format.js';

/** What a raw capture's sender states about it (in request headers or CLI options). */
export interface RawFloat32Options {
  /** Sample rate in Hz, a whole number in 8000…192000. */
  sampleRate: number;
  /** Interleaved channel count, 1…8. */
  channels: number;
}

/**
 * Decodes headerless interleaved little-endian IEEE-754 float32 samples (the output of a
 * bit-exact host simulation) into per-channel Float64Arrays; values are copied unchanged.
 *
 * @throws AudioDecodeError `invalid-option` (rate or channels not whole numbers),
 *   `zero-channels`, `too-many-channels`, `sample-rate-out-of-range`, `no-data` (0 bytes),
 *   `raw-length-mismatch` (length not a multiple of 4 × channels), `too-many-samples` (more
 *   than `limits.maxSamples`, checked before allocating) or `non-finite-sample`.
 */
export function decodeRawFloat32(bytes: Uint8Array, opts: RawFloat32Options, limits: DecodeLimits = DEFAULT_DECODE_LIMITS): DecodedAudio {
  if (!(bytes instanceof Uint8Array)) throw new TypeError('A raw float32 capture must be given as a Uint8Array of its bytes.');
  const { sampleRate, channels } = opts;
  if (!Number.isInteger(sampleRate) || !Number.isInteger(channels)) {
    throw new AudioDecodeError(
      'invalid-option',
      `The sample rate and channel count of a raw capture must be whole numbers (got ${sampleRate} Hz, ${channels} channels).`,
    );
  }
  if (channels <= 0) {
    throw new AudioDecodeError('zero-channels', `The channel count is ${channels}; a raw capture needs 1 to ${MAX_CHANNELS} channels.`);
  }
  if (channels > MAX_CHANNELS) {
    throw new AudioDecodeError(
      'too-many-channels',
      `The channel count is ${channels}; Earmark accepts 1 to ${MAX_CHANNELS} channels.`,
    );
  }
  if (sampleRate < MIN_SAMPLE_RATE || sampleRate > MAX_SAMPLE_RATE) {
    throw new AudioDecodeError(
      'sample-rate-out-of-range',
      `The sample rate ${sampleRate} Hz is outside the accepted range ${MIN_SAMPLE_RATE}–${MAX_SAMPLE_RATE} Hz.`,
    );
  }
  if (bytes.length === 0) {
    throw new AudioDecodeError('no-data', 'The raw capture is empty (0 bytes).');
  }
  const frameBytes = 4 * channels;
  if (bytes.length % frameBytes !== 0) {
    throw new AudioDecodeError(
      'raw-length-mismatch',
      `The raw capture's ${bytes.length} bytes are not a whole number of frames of ${channels} float32 sample(s) (${frameBytes} bytes each); check the declared channel count and that the upload is complete.`,
    );
  }
  const frames = bytes.length / frameBytes;
  assertWithinSampleBudget(frames, channels, limits);
  const decoded = readInterleaved(bytes, 0, frames, channels, 'f32');
  if (decoded.nonFinite !== undefined) {
    const { frame, channel, value } = decoded.nonFinite;
    throw new AudioDecodeError(
      'non-finite-sample',
      `Sample ${frame} of channel ${channel + 1} is ${value}; float captures must hold finite numbers only.`,
    );
  }
  return {
    sampleRate,
    frames,
    channels: decoded.channels,
    format: { container: 'raw-f32le', encoding: 'float', bitsPerSample: 32, formatTag: WAVE_FORMAT_IEEE_FLOAT, extensible: false },
  };
}
