/**
 * Thrown inside a check's evaluation when the check cannot be evaluated on this input (it needs
 * a stimulus and none was given, a channel it names does not exist, the stimulus has no energy
 * where the check looks). `evaluateMask` turns it into the check's `error`; the verdict becomes
 * `error`, never a silent pass.
 */
export class MaskCheckError extends Error {
  override readonly name = 'MaskCheckError';
}
