import { createSeededRandom } from '../stimulus/seeded-random.js';
import { MAX_CHANNELS, MAX_SAMPLE_RATE, MIN_SAMPLE_RATE } from './audio-limits.js';
import { SUBFORMAT_GUID_TAIL, WAVE_FORMAT_EXTENSIBLE, WAVE_FORMAT_IEEE_FLOAT, WAVE_FORMAT_PCM } from './wav-format.js';
import { EngineInputError } from '../util/engine-input-error.js';

/** How encodeWav stores samples. */
export interface EncodeWavOptions {
  /** `pcm-int` (default) or IEEE `float`. */
  encoding?: 'pcm-int' | 'float';
  /** PCM: 16, 24 (default) or 32; float: 32 (default) or 64. */
  bitsPerSample?: 16 | 24 | 32 | 64;
  /**
   * Triangular-PDF dither of ±1 LSB added before rounding (PCM only); off by default so
   * that a stimulus file is the same bytes on every run. The seed makes dither repeatable.
   */
  dither?: { kind: 'tpdf'; seed: number };
}

function writeAscii(view: DataView, at: number, text: string): void {
  for (let i = 0; i < text.length; i++) view.setUint8(at + i, text.charCodeAt(i));
}

/**
 * Encodes per-channel samples (full scale ±1) as a little-endian RIFF/WAVE file.
 *
 * PCM of b bits: each sample x becomes round(x·2^(b−1)) (Math.round, halves upward), clamped
 * to [−2^(b−1), 2^(b−1)−1]; so decodeWav gives back x within ½ LSB for x in
 * [−1, 1 − 2^(1−b)], and +1.0 is stored as the largest code (1 LSB low). Without `dither`
 * the output is a pure function of the input. With `dither: { kind: 'tpdf' }` the difference
 * of two independent uniform variates (±1 LSB triangular PDF; J. Vanderkooy and
 * S. P. Lipshitz, "Dither in digital audio", JAES 35(12), 1987) is added before rounding.
 * Float: samples stored as float32 (rounded to nearest) or float64 (exact), not clamped.
 * One or two channels get the plain header (format tag 1 or 3; float with a `fact` chunk);
 * more channels get WAVE_FORMAT_EXTENSIBLE with channel mask 0 (no speaker positions).
 *
 * @throws RangeError when there are 0 or more than 8 channels, channels differ in length,
 *   the rate is not a whole number in 8000…192000 Hz, the bit depth does not suit the
 *   encoding, a sample is NaN or infinite, or the file would exceed 4 GiB.
 */
export function encodeWav(channels: Float64Array[], sampleRate: number, opts: EncodeWavOptions = {}): Uint8Array {
  const channelCount = channels.length;
  if (channelCount === 0 || channelCount > MAX_CHANNELS) {
    throw new EngineInputError('encodeWav', `a WAV file needs 1 to ${MAX_CHANNELS} channels (got ${channelCount})`);
  }
  const frames = channels[0]?.length ?? 0;
  if (channels.some((c) => c.length !== frames)) {
    throw new EngineInputError('encodeWav', 'all channels must have the same length');
  }
  if (!Number.isInteger(sampleRate) || sampleRate < MIN_SAMPLE_RATE || sampleRate > MAX_SAMPLE_RATE) {
    throw new EngineInputError('encodeWav', `sample rate must be a whole number of Hz in ${MIN_SAMPLE_RATE}…${MAX_SAMPLE_RATE}, got ${sampleRate}`);
  }
  const encoding = opts.encoding ?? 'pcm-int';
  const bits = opts.bitsPerSample ?? (encoding === 'float' ? 32 : 24);
  const valid = encoding === 'float' ? bits === 32 || bits === 64 : bits === 16 || bits === 24 || bits === 32;
  if (!valid) {
    throw new EngineInputError('encodeWav', `${bits}-bit ${encoding} is not supported (PCM: 16, 24, 32; float: 32, 64)`);
  }
  for (let c = 0; c < channelCount; c++) {
    const ch = channels[c] as Float64Array;
    for (let i = 0; i < frames; i++) {
      if (!Number.isFinite(ch[i] as number)) {
        throw new EngineInputError('encodeWav', `sample ${i} of channel ${c + 1} is ${ch[i]}; only finite samples can be written`);
      }
    }
  }

  const bytesPerSample = bits / 8;
  const blockAlign = bytesPerSample * channelCount;
  const dataSize = frames * blockAlign;
  const extensible = channelCount > 2;
  const isFloat = encoding === 'float';
  const fmtSize = extensible ? 40 : isFloat ? 18 : 16;
  const hasFact = isFloat || extensible;
  const headerSize = 12 + 8 + fmtSize + (hasFact ? 12 : 0) + 8;
  const total = headerSize + dataSize + (dataSize % 2);
  if (total - 8 > 0xffffffff) throw new EngineInputError('encodeWav', 'the audio is too long for a WAV file (over 4 GiB)');

  const out = new Uint8Array(total);
  const view = new DataView(out.buffer);
  writeAscii(view, 0, 'RIFF');
  view.setUint32(4, total - 8, true);
  writeAscii(view, 8, 'WAVE');
  writeAscii(view, 12, 'fmt ');
  view.setUint32(16, fmtSize, true);
  const tag = isFloat ? WAVE_FORMAT_IEEE_FLOAT : WAVE_FORMAT_PCM;
  view.setUint16(20, extensible ? WAVE_FORMAT_EXTENSIBLE : tag, true);
  view.setUint16(22, channelCount, true);
  view.setUint32(24, sampleRate, true);
  view.setUint32(28, sampleRate * blockAlign, true);
  view.setUint16(32, blockAlign, true);
  view.setUint16(34, bits, true);
  let at = 36;
  if (fmtSize >= 18) view.setUint16(at, fmtSize - 18, true);
  if (extensible) {
    view.setUint16(38, bits, true); // valid bits
    view.setUint32(40, 0, true); // channel mask: no speaker positions assigned
    view.setUint32(44, tag, true);
    SUBFORMAT_GUID_TAIL.forEach((b, i) => view.setUint8(48 + i, b));
  }
  at = 20 + fmtSize;
  if (hasFact) {
    writeAscii(view, at, 'fact');
    view.setUint32(at + 4, 4, true);
    view.setUint32(at + 8, frames, true);
    at += 12;
  }
  writeAscii(view, at, 'data');
  view.setUint32(at + 4, dataSize, true);
  at += 8;

  const random = opts.dither !== undefined && !isFloat ? createSeededRandom(opts.dither.seed) : undefined;
  const scale = 2 ** (bits - 1);
  const max = scale - 1;
  const min = -scale;
  for (let c = 0; c < channelCount; c++) {
    const ch = channels[c] as Float64Array;
    let p = at + c * bytesPerSample;
    for (let i = 0; i < frames; i++, p += blockAlign) {
      const x = ch[i] as number;
      if (isFloat) {
        if (bits === 32) view.setFloat32(p, x, true);
        else view.setFloat64(p, x, true);
        continue;
      }
      const d = random === undefined ? 0 : random.next() - random.next();
      let q = Math.round(x * scale + d);
      q = q > max ? max : q < min ? min : q;
      if (bits === 16) view.setInt16(p, q, true);
      else if (bits === 32) view.setInt32(p, q, true);
      else {
        view.setUint16(p, q & 0xffff, true);
        view.setInt8(p + 2, q >> 16);
      }
    }
  }
  return out;
}
