/** Why a stimulus could not be generated. */
export type StimulusErrorCode = 'invalid-spec' | 'level-above-full-scale' | 'would-clip' | 'too-long';

/** A stimulus spec the generator refuses; the message names the field and the fix. */
export class StimulusError extends Error {
  override readonly name = 'StimulusError';
  readonly code: StimulusErrorCode;

  constructor(code: StimulusErrorCode, message: string) {
    super(message);
    this.code = code;
  }
}
