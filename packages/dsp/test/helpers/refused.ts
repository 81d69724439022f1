import { expect } from 'vitest';

/** A message that starts like `someFunction: …`, which users must never read. */
export const FUNCTION_NAME_PREFIX = /^[A-Za-z][A-Za-z0-9]*(\.[A-Za-z0-9]+)?: /;

/**
 * Matches the EngineInputError an engine precondition throws: the refusing function in `fn`,
 * and a message that reads `message` (or, when none is given, at least does not start with a
 * function name).
 */
export function refusedBy(fn: string, message?: RegExp): unknown {
  return expect.objectContaining({
    name: 'EngineInputError',
    fn,
    message: message ? expect.stringMatching(message) : expect.not.stringMatching(FUNCTION_NAME_PREFIX),
  });
}
