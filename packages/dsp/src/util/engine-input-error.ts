/**
 * An engine function refused its input. Its message reaches people (as a check's error, a
 * verdict reason or a problem detail), so it says what was wrong in their terms and never
 * starts with a function name; `fn` names the refusing function for developers and logs.
 */
export class EngineInputError extends RangeError {
  override readonly name = 'EngineInputError';

  constructor(
    readonly fn: string,
    message: string,
  ) {
    super(message);
  }
}
