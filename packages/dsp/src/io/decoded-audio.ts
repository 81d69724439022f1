/** How the decoded bytes were laid out, for reports and for the capture's stored metadata. */
export interface AudioFormat {
  /** `wav`: a RIFF/WAVE file; `raw-f32le`: headerless little-endian float32. */
  container: 'wav' | 'raw-f32le';
  /** Integer PCM or IEEE floating point samples. */
  encoding: 'pcm-int' | 'float';
  /** Container size of one sample in bits (8, 16, 24, 32 or 64). */
  bitsPerSample: number;
  /** The format tag as read (1 PCM, 3 IEEE float, 0xFFFE extensible); 3 for raw float32. */
  formatTag: number;
  /** True when the file used WAVE_FORMAT_EXTENSIBLE. */
  extensible: boolean;
  /** Speaker-position mask of an extensible file (0 = no positions assigned). */
  channelMask?: number;
  /** Valid bits of an extensible file's samples (≤ bitsPerSample). */
  validBitsPerSample?: number;
}

/**
 * Audio after decoding: one Float64Array per channel, full scale ±1.
 * Integer PCM of b bits is divided by 2^(b−1) (so the most negative code is exactly −1);
 * 8-bit unsigned PCM has 128 subtracted first. Float samples are copied unchanged.
 */
export interface DecodedAudio {
  sampleRate: number;
  frames: number;
  channels: Float64Array[];
  format: AudioFormat;
}
