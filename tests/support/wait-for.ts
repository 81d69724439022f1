/** What a wait is for, how long it may take, and what to add to the error when it times out. */
export interface WaitForOptions {
  /** Named in the timeout error: "a verdict for capture …", "the plot cache entry". */
  what: string;
  timeoutMs: number;
  /** Pause between polls (default 100 ms). */
  intervalMs?: number;
  /** Extra context for the timeout error, read only when it times out (e.g. the worker's last output). */
  context?: () => string;
}

type Ready<T> = Exclude<T, null | undefined | false>;

/**
 * Polls `condition` until it returns something other than null, undefined or false, and
 * returns that. Jobs run in another process, so tests wait on what the job leaves behind
 * (a verdict, a mail, a row) instead of sleeping a guessed time.
 * @throws Error naming `what` when `timeoutMs` passes first
 */
export async function waitFor<T>(condition: () => T | Promise<T>, options: WaitForOptions): Promise<Ready<T>> {
  const { what, timeoutMs, intervalMs = 100, context } = options;
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await condition();
    if (value !== null && value !== undefined && value !== false) return value as Ready<T>;
    if (Date.now() >= deadline) {
      const extra = context?.();
      throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}${extra ? `\n${extra}` : ''}`);
    }
    await new Promise((resolve) => setTimeout(resolve, intervalMs));
  }
}
