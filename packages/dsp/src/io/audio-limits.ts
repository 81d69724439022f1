/** Lowest sample rate the engine accepts (Hz). */
export const MIN_SAMPLE_RATE = 8000;
/** Highest sample rate the engine accepts (Hz). */
export const MAX_SAMPLE_RATE = 192000;
/** Most channels a capture may have. */
export const MAX_CHANNELS = 8;

/**
 * Most chunks a WAV file may hold (fmt, data, LIST, fact, JUNK, … all count). Real writers
 * emit fewer than ten; the bound stops a file of millions of empty chunks from stalling the
 * decoder and filling memory with chunk records. The walk gives up at chunk 65.
 */
export const MAX_RIFF_CHUNKS = 64;

/**
 * Most samples (frames × channels) one capture may decode to: 2^25 = 33,554,432. Each sample
 * becomes a Float64, so the decoded audio is at most 256 MiB; analysis buffers (FFT, spectra)
 * come on top. 60 s at 192 kHz in stereo is 23 M samples; 8 channels fit 21.8 s at 192 kHz.
 * Checked from the header before anything is allocated.
 */
export const MAX_DECODED_SAMPLES = 2 ** 25;

/** Bounds a decoder enforces; tests pass smaller ones to exercise the limit without gigabytes. */
export interface DecodeLimits {
  /** Most frames × channels to decode. */
  maxSamples: number;
}

export const DEFAULT_DECODE_LIMITS: Readonly<DecodeLimits> = { maxSamples: MAX_DECODED_SAMPLES };
