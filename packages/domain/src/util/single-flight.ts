/** Runs one piece of work per key at a time: callers asking for a key already under way share its answer. */
export class SingleFlight<T> {
  private readonly pending = new Map<string, Promise<T>>();

  run(key: string, work: () => Promise<T>): Promise<T> {
    let promise = this.pending.get(key);
    if (!promise) {
      promise = work().finally(() => this.pending.delete(key));
      this.pending.set(key, promise);
    }
    return promise;
  }
}
