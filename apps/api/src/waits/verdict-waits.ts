/** Why a held request stopped waiting. */
export type WakeReason = 'notified' | 'timeout' | 'aborted';

export interface VerdictWait {
  /**
   * Resolves when a verdict for the capture is announced (or the listener reconnected and
   * announcements may have been missed), when `ms` pass, or when `signal` aborts (the client
   * went away). Call once.
   */
  until(ms: number, signal: AbortSignal): Promise<WakeReason>;
  /** Frees the slot; safe to call more than once. */
  release(): void;
}

/**
 * Fans verdict announcements out to held requests, at most `maxHeld` at once per process.
 * Pure bookkeeping: the LISTEN connection (pg-listener.ts) calls `announce`, and
 * `isListening` says whether announcements can arrive at all.
 */
export class VerdictWaits {
  private readonly byCapture = new Map<string, Set<() => void>>();
  private heldCount = 0;

  constructor(
    private readonly maxHeld: number,
    private readonly isListening: () => boolean,
  ) {}

  /**
   * Takes a slot before the caller's first read, so a verdict committed between that read and the
   * wait still wakes it. Null when every slot is taken or nothing is listening: answer at once.
   */
  open(captureId: string): VerdictWait | null {
    if (this.heldCount >= this.maxHeld || !this.isListening()) return null;
    this.heldCount += 1;
    let announced = false;
    let wake: (() => void) | null = null;
    const listener = () => {
      announced = true;
      wake?.();
    };
    const listeners = this.byCapture.get(captureId) ?? new Set();
    listeners.add(listener);
    this.byCapture.set(captureId, listeners);
    let released = false;
    const release = () => {
      if (released) return;
      released = true;
      this.heldCount -= 1;
      listeners.delete(listener);
      if (listeners.size === 0 && this.byCapture.get(captureId) === listeners) this.byCapture.delete(captureId);
    };
    return {
      release,
      until: (ms, signal) =>
        new Promise<WakeReason>((resolve) => {
          if (announced) return resolve('notified');
          if (signal.aborted) return resolve('aborted');
          const finish = (reason: WakeReason) => {
            clearTimeout(timer);
            signal.removeEventListener('abort', onAbort);
            wake = null;
            resolve(reason);
          };
          const onAbort = () => finish('aborted');
          const timer = setTimeout(() => finish('timeout'), ms);
          signal.addEventListener('abort', onAbort, { once: true });
          wake = () => finish('notified');
        }),
    };
  }

  /** A verdict of this capture was committed. */
  announce(captureId: string): void {
    for (const listener of this.byCapture.get(captureId) ?? []) listener();
  }

  /** Wakes every held request (after a reconnect, or at shutdown) so each re-reads and answers. */
  wakeAll(): void {
    for (const listeners of this.byCapture.values()) for (const listener of listeners) listener();
  }

  get held(): number {
    return this.heldCount;
  }
}
