/**
 * Exit codes shared by every command (docs/ci.md, "Exit codes"). A pipeline reacts to each
 * differently: 1 blocks the build (a verdict said out of tolerance), 2 needs a look at the
 * set-up (a capture could not be judged), 3 is worth a retry or a fixed invocation (the run
 * itself could not finish, so nothing was judged).
 */
export const EXIT = {
  /** pass, or the command did what it was asked */
  ok: 0,
  /** a verdict (or, for submit --wait, the build-status rule) says fail */
  fail: 1,
  /** an error verdict: a capture or check could not be judged */
  error: 2,
  /** the run could not finish: usage error, unreadable input, network or server trouble, --timeout */
  incomplete: 3,
} as const;
export type ExitCode = (typeof EXIT)[keyof typeof EXIT];

/** Commander's own exits (help, usage errors) in Earmark's scheme: help is 0, any usage error 3. */
export function usageExitCode(commanderExitCode: number): ExitCode {
  return commanderExitCode === 0 ? EXIT.ok : EXIT.incomplete;
}

/** Prints one clear line (or the stack with --debug) and exits 3: the run could not finish. */
export function exitWithError(error: unknown, debug: boolean): never {
  const message = error instanceof Error ? error.message : String(error);
  process.stderr.write(`earmark: ${message}\n`);
  if (debug && error instanceof Error && error.stack) process.stderr.write(`${error.stack}\n`);
  process.exit(EXIT.incomplete);
}
