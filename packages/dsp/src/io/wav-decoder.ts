import { ACCEPTED_CAPTURE_FORMATS, AudioDecodeError } from './audio-decode-error.js';
import { DEFAULT_DECODE_LIMITS, MAX_CHANNELS, MAX_SAMPLE_RATE, MIN_SAMPLE_RATE, type DecodeLimits } from './audio-limits.js';
import type { AudioFormat, DecodedAudio } from './decoded-audio.js';
import { readInterleaved, type SampleLayout } from './interleaved-reader.js';
import { readRiffChunks, type RiffChunk } from './riff-chunks.js';
import { assertWithinSampleBudget } from './sample-budget.js';
import { SUBFORMAT_GUID_TAIL, WAVE_FORMAT_EXTENSIBLE, WAVE_FORMAT_IEEE_FLOAT, WAVE_FORMAT_PCM } from './wav-format.js';

interface FmtInfo {
  formatTag: number;
  /** PCM or float after resolving an extensible sub-format. */
  effectiveTag: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  bitsPerSample: number;
  extensible: boolean;
  channelMask?: number;
  validBitsPerSample?: number;
}

function hex(n: number): string {
  return `0x${n.toString(16).toUpperCase().padStart(4, '0')}`;
}

function parseFmt(bytes: Uint8Array, chunk: RiffChunk): FmtInfo {
  if (chunk.size < 16 || chunk.offset + 16 > bytes.length) {
    throw new AudioDecodeError(
      'truncated',
      `The "fmt " chunk is cut short (${Math.min(chunk.size, bytes.length - chunk.offset)} of at least 16 bytes); the file header is truncated or damaged.`,
    );
  }
  const v = new DataView(bytes.buffer, bytes.byteOffset + chunk.offset, bytes.length - chunk.offset);
  const formatTag = v.getUint16(0, true);
  const info: FmtInfo = {
    formatTag,
    effectiveTag: formatTag,
    channels: v.getUint16(2, true),
    sampleRate: v.getUint32(4, true),
    blockAlign: v.getUint16(12, true),
    bitsPerSample: v.getUint16(14, true),
    extensible: formatTag === WAVE_FORMAT_EXTENSIBLE,
  };
  if (info.extensible) {
    if (chunk.size < 40 || chunk.offset + 40 > bytes.length) {
      throw new AudioDecodeError(
        'truncated',
        'The WAVE_FORMAT_EXTENSIBLE "fmt " chunk is shorter than its 40 bytes; the file header is truncated or damaged.',
      );
    }
    info.validBitsPerSample = v.getUint16(18, true);
    info.channelMask = v.getUint32(20, true);
    const sub = v.getUint32(24, true);
    const tailMatches = SUBFORMAT_GUID_TAIL.every((b, i) => v.getUint8(28 + i) === b);
    if (!tailMatches || (sub !== WAVE_FORMAT_PCM && sub !== WAVE_FORMAT_IEEE_FLOAT)) {
      throw new AudioDecodeError(
        'unsupported-format',
        `The WAVE_FORMAT_EXTENSIBLE sub-format is not supported (only the PCM and IEEE float sub-format GUIDs are read). ${ACCEPTED_CAPTURE_FORMATS}`,
      );
    }
    info.effectiveTag = sub;
  }
  if (info.effectiveTag !== WAVE_FORMAT_PCM && info.effectiveTag !== WAVE_FORMAT_IEEE_FLOAT) {
    throw new AudioDecodeError(
      'unsupported-format',
      `The WAV format tag ${hex(formatTag)} is not supported (compressed or vendor-specific audio). ${ACCEPTED_CAPTURE_FORMATS}`,
    );
  }
  return info;
}

function layoutOf(fmt: FmtInfo): SampleLayout {
  const bits = fmt.bitsPerSample;
  if (fmt.effectiveTag === WAVE_FORMAT_IEEE_FLOAT) {
    if (bits === 32) return 'f32';
    if (bits === 64) return 'f64';
    throw new AudioDecodeError(
      'unsupported-bit-depth',
      `IEEE float samples of ${bits} bits are not supported; float WAV must be 32 or 64 bits.`,
    );
  }
  if (bits === 8) return 'u8';
  if (bits === 16) return 'i16';
  if (bits === 24) return 'i24';
  if (bits === 32) return 'i32';
  throw new AudioDecodeError(
    'unsupported-bit-depth',
    `Integer PCM of ${bits} bits per sample is not supported; PCM WAV must be 8, 16, 24 or 32 bits.`,
  );
}

function checkFmt(fmt: FmtInfo): SampleLayout {
  if (fmt.channels === 0) {
    throw new AudioDecodeError('zero-channels', 'The WAV header declares 0 channels; a capture needs 1 to 8 channels.');
  }
  if (fmt.channels > MAX_CHANNELS) {
    throw new AudioDecodeError(
      'too-many-channels',
      `The file has ${fmt.channels} channels; Earmark accepts 1 to ${MAX_CHANNELS}. Split the capture per test case or channel map.`,
    );
  }
  const layout = layoutOf(fmt);
  const expectedAlign = (fmt.channels * fmt.bitsPerSample) / 8;
  if (fmt.blockAlign !== expectedAlign) {
    throw new AudioDecodeError(
      'block-align-mismatch',
      `The WAV header is inconsistent: ${fmt.channels} channel(s) × ${fmt.bitsPerSample} bits need a block align of ${expectedAlign} bytes per frame, but it says ${fmt.blockAlign}.`,
    );
  }
  if (fmt.validBitsPerSample !== undefined && (fmt.validBitsPerSample === 0 || fmt.validBitsPerSample > fmt.bitsPerSample)) {
    throw new AudioDecodeError(
      'unsupported-format',
      `The WAVE_FORMAT_EXTENSIBLE header declares ${fmt.validBitsPerSample} valid bits in a ${fmt.bitsPerSample}-bit container; valid bits must be 1 to ${fmt.bitsPerSample}.`,
    );
  }
  if (fmt.sampleRate < MIN_SAMPLE_RATE || fmt.sampleRate > MAX_SAMPLE_RATE) {
    throw new AudioDecodeError(
      'sample-rate-out-of-range',
      `The sample rate ${fmt.sampleRate} Hz is outside the accepted range ${MIN_SAMPLE_RATE}–${MAX_SAMPLE_RATE} Hz.`,
    );
  }
  return layout;
}

/**
 * Decodes a RIFF/WAVE file into per-channel Float64Arrays at full scale ±1.
 *
 * Reads integer PCM (8-bit unsigned, 16/24/32-bit signed) and IEEE float (32/64-bit), in the
 * plain format or WAVE_FORMAT_EXTENSIBLE with the PCM or IEEE-float sub-format GUID, 1–8
 * channels, 8–192 kHz. Chunks may come in any order (LIST, fact, bext, … are skipped) and
 * odd-sized chunks carry a pad byte. Integer samples of b container bits are divided by
 * 2^(b−1), the usual normalisation of scipy.io.wavfile users (scipy returns 24-bit data
 * left-justified in int32, so dividing by 2^31 there gives the same numbers). Float samples
 * must be finite. Layout source: Microsoft, "Multimedia Programming Interface and Data
 * Specifications 1.0" (1991) and the WAVEFORMATEXTENSIBLE documentation (ksmedia.h).
 *
 * Hostile files are bounded: at most MAX_RIFF_CHUNKS chunks are walked, and the frames the
 * `data` chunk declares × channels must not exceed `limits.maxSamples` (checked from the
 * header, before the file length and before any sample buffer is allocated).
 *
 * @throws AudioDecodeError with code `not-riff`, `too-many-chunks`, `truncated`, `no-format`,
 *   `duplicate-chunk`, `unsupported-format`, `unsupported-bit-depth`, `zero-channels`,
 *   `too-many-channels`, `block-align-mismatch`, `sample-rate-out-of-range`, `too-many-samples`,
 *   `data-exceeds-file`, `partial-frame`, `no-data` or `non-finite-sample`; the message says
 *   what was wrong and what is accepted.
 */
export function decodeWav(bytes: Uint8Array, limits: DecodeLimits = DEFAULT_DECODE_LIMITS): DecodedAudio {
  if (!(bytes instanceof Uint8Array)) throw new TypeError('A WAV capture must be given as a Uint8Array of its bytes.');
  const chunks = readRiffChunks(bytes);
  let fmtChunk: RiffChunk | undefined;
  let dataChunk: RiffChunk | undefined;
  for (const chunk of chunks) {
    if (chunk.id !== 'fmt ' && chunk.id !== 'data') continue;
    if ((chunk.id === 'fmt ' ? fmtChunk : dataChunk) !== undefined) {
      throw new AudioDecodeError(
        'duplicate-chunk',
        `The file has more than one "${chunk.id.trim()}" chunk; a WAV capture must hold exactly one.`,
      );
    }
    if (chunk.id === 'fmt ') fmtChunk = chunk;
    else dataChunk = chunk;
  }
  if (fmtChunk === undefined) {
    const truncated = bytes.length < 12 + 8 + 16;
    throw new AudioDecodeError(
      truncated ? 'truncated' : 'no-format',
      truncated
        ? `The file ends after ${bytes.length} bytes, inside the WAV header; it was truncated.`
        : 'The WAV file has no "fmt " chunk, so its sample format is unknown.',
    );
  }
  const fmt = parseFmt(bytes, fmtChunk);
  const layout = checkFmt(fmt);
  if (dataChunk === undefined) {
    throw new AudioDecodeError('no-data', 'The WAV file has no "data" chunk, so it holds no audio.');
  }
  assertWithinSampleBudget(Math.floor(dataChunk.size / fmt.blockAlign), fmt.channels, limits);
  const available = bytes.length - dataChunk.offset;
  if (dataChunk.size > available) {
    throw new AudioDecodeError(
      'data-exceeds-file',
      `The "data" chunk declares ${dataChunk.size} bytes but only ${Math.max(0, available)} follow; the file was truncated (an interrupted upload or a writer that never finalised the header).`,
    );
  }
  if (dataChunk.size === 0) {
    throw new AudioDecodeError('no-data', 'The "data" chunk is empty; the capture holds no audio frames.');
  }
  if (dataChunk.size % fmt.blockAlign !== 0) {
    throw new AudioDecodeError(
      'partial-frame',
      `The "data" chunk holds ${dataChunk.size} bytes, not a whole number of ${fmt.blockAlign}-byte frames; the last frame is incomplete.`,
    );
  }
  const frames = dataChunk.size / fmt.blockAlign;
  const { channels, nonFinite } = readInterleaved(bytes, dataChunk.offset, frames, fmt.channels, layout);
  if (nonFinite !== undefined) {
    throw new AudioDecodeError(
      'non-finite-sample',
      `Sample ${nonFinite.frame} of channel ${nonFinite.channel + 1} is ${nonFinite.value}; float captures must hold finite numbers only (check the firmware's output buffer).`,
    );
  }
  const format: AudioFormat = {
    container: 'wav',
    encoding: fmt.effectiveTag === WAVE_FORMAT_IEEE_FLOAT ? 'float' : 'pcm-int',
    bitsPerSample: fmt.bitsPerSample,
    formatTag: fmt.formatTag,
    extensible: fmt.extensible,
  };
  if (fmt.channelMask !== undefined) format.channelMask = fmt.channelMask;
  if (fmt.validBitsPerSample !== undefined) format.validBitsPerSample = fmt.validBitsPerSample;
  return { sampleRate: fmt.sampleRate, frames, channels, format };
}
