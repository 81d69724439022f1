import { decodeRawFloat32 } from './raw-float32-decoder.js';
import { decodeWav } from './wav-decoder.js';
import type { DecodedAudio } from './decoded-audio.js';

/** How a stored capture was recorded at upload (the capture row's format columns). */
export interface StoredCaptureFormat {
  container: 'wav' | 'raw-f32le';
  sampleRate: number;
  channels: number;
}

/**
 * Decodes stored capture bytes exactly as the upload validated them: WAV by its header,
 * raw float32 by the rate and channel count given at upload.
 * @throws AudioDecodeError for bytes that are not a readable capture
 */
export function decodeCapture(bytes: Uint8Array, format: StoredCaptureFormat): DecodedAudio {
  return format.container === 'raw-f32le' ? decodeRawFloat32(bytes, { sampleRate: format.sampleRate, channels: format.channels }) : decodeWav(bytes);
}
