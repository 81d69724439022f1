export type { AudioFormat, DecodedAudio } from './decoded-audio.js';
export { AudioDecodeError, ACCEPTED_CAPTURE_FORMATS, type AudioDecodeErrorCode } from './audio-decode-error.js';
export { decodeWav } from './wav-decoder.js';
export { decodeRawFloat32, type RawFloat32Options } from './raw-float32-decoder.js';
export { encodeWav, type EncodeWavOptions } from './wav-encoder.js';
export { WAVE_FORMAT_EXTENSIBLE, WAVE_FORMAT_IEEE_FLOAT, WAVE_FORMAT_PCM } from './wav-format.js';
export { decodeCapture, type StoredCaptureFormat } from './decode-capture.js';
export { MAX_DECODED_SAMPLES, MAX_RIFF_CHUNKS, DEFAULT_DECODE_LIMITS, type DecodeLimits } from './audio-limits.js';
