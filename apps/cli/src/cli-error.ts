/**
 * Exit codes shared by every command: 0 pass/success, 1 fail (a verdict said so),
 * 2 error (bad input, unreadable file, server or network trouble, timeout).
 */
export const EXIT = { ok: 0, fail: 1, error: 2 } as const;

/** Prints one clear line (or the stack with --debug) and exits with code 2. */
export function exitWithError(error: unknown, debug: boolean): never {
  const message = error instanceof Error ? error.message : String(error);
  process.stderr.write(`earmark: ${message}\n`);
  if (debug && error instanceof Error && error.stack) process.stderr.write(`${error.stack}\n`);
  process.exit(EXIT.error);
}
