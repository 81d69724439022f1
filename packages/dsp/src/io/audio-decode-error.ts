/** Every reason a capture can be refused; stable strings that APIs and tests match on. */
export type AudioDecodeErrorCode =
  | 'not-riff'
  | 'truncated'
  | 'no-format'
  | 'duplicate-chunk'
  | 'unsupported-format'
  | 'unsupported-bit-depth'
  | 'zero-channels'
  | 'too-many-channels'
  | 'block-align-mismatch'
  | 'sample-rate-out-of-range'
  | 'data-exceeds-file'
  | 'partial-frame'
  | 'no-data'
  | 'non-finite-sample'
  | 'raw-length-mismatch'
  | 'invalid-option'
  | 'too-many-chunks'
  | 'too-many-samples';

/**
 * A capture that cannot be decoded. The message says what was wrong and what is accepted,
 * in words a CI user can act on; `code` is for programs.
 */
export class AudioDecodeError extends Error {
  override readonly name = 'AudioDecodeError';
  readonly code: AudioDecodeErrorCode;

  constructor(code: AudioDecodeErrorCode, message: string) {
    super(message);
    this.code = code;
  }
}

/** What Earmark accepts, appended to format errors so the reader knows the way forward. */
export const ACCEPTED_CAPTURE_FORMATS =
  'Earmark accepts WAV (integer PCM 8/16/24/32-bit or IEEE float 32/64-bit, plain or WAVE_FORMAT_EXTENSIBLE, ' +
  '1–8 channels, 8–192 kHz) and raw little-endian float32.';
