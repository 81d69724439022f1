/**
 * Where one job's time goes, step by step, for its log line: `lap('fetch')` charges the time since
 * the previous lap (or the start) to `fetch`. Operators read it to see whether the engine, the
 * object store or the database holds a slot up (docs/performance.md, "Per-job overhead").
 */
export interface JobSteps {
  lap(step: string): void;
  /** Charges the time `work` takes to `step` (for steps that run beside others); the answer passes through. */
  time<T>(step: string, work: Promise<T>): Promise<T>;
  /** Milliseconds per step, rounded to 0.1 ms, and `totalMs` since the start. */
  summary(): Record<string, number>;
}

export function startJobSteps(now: () => number = () => performance.now()): JobSteps {
  const started = now();
  let last = started;
  const steps: Record<string, number> = {};
  const round = (ms: number) => Math.round(ms * 10) / 10;
  return {
    lap(step) {
      const at = now();
      steps[step] = round((steps[step] ?? 0) + at - last);
      last = at;
    },
    async time(step, work) {
      const from = now();
      try {
        return await work;
      } finally {
        steps[step] = round((steps[step] ?? 0) + now() - from);
      }
    },
    summary: () => ({ ...steps, totalMs: round(last - started) }),
  };
}
