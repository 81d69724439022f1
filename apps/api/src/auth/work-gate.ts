/**
 * Bounds CPU-heavy work (bcrypt) so a flood of sign-ins cannot starve every other request:
 * at most `concurrency` run at once, up to `queueLength` wait, and the rest are turned away.
 */
export class WorkGate {
  private running = 0;
  private readonly waiting: Array<() => void> = [];

  constructor(private readonly concurrency: number, private readonly queueLength: number) {}

  /** Resolves with a release function once a slot is free; null when the queue is full. */
  async enter(): Promise<(() => void) | null> {
    if (this.running < this.concurrency) {
      this.running += 1;
      return this.releaser();
    }
    if (this.waiting.length >= this.queueLength) return null;
    // The releasing holder hands its slot straight to the next waiter, so `running` stays put.
    await new Promise<void>((resolve) => this.waiting.push(resolve));
    return this.releaser();
  }

  get stats(): { running: number; waiting: number } {
    return { running: this.running, waiting: this.waiting.length };
  }

  private releaser(): () => void {
    let released = false;
    return () => {
      if (released) return;
      released = true;
      const next = this.waiting.shift();
      if (next) next();
      else this.running -= 1;
    };
  }
}
