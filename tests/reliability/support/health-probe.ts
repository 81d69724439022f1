import { latencySummary } from './stats.js';

export interface HealthProbe {
  /** Stops probing and summarises: latency percentiles (ms), how many probes failed or were not 200. */
  stop(): Promise<{ p50: number; p95: number; p99: number; n: number; failures: number; worstMs: number }>;
}

/**
 * Calls GET /api/health every `intervalMs` (each probe starts on schedule, not after the previous
 * one ends, so a blocked event loop shows as long latencies, not as fewer samples).
 * A probe taking longer than `timeoutMs` counts as its timeout and as a failure.
 */
export function startHealthProbe(baseUrl: string, intervalMs = 50, timeoutMs = 10_000): HealthProbe {
  const latencies: number[] = [];
  let failures = 0;
  const inFlight = new Set<Promise<void>>();
  const probe = () => {
    const started = performance.now();
    const p = fetch(`${baseUrl}/api/health`, { signal: AbortSignal.timeout(timeoutMs) })
      .then(async (res) => {
        await res.arrayBuffer();
        if (res.status !== 200) failures++;
        latencies.push(performance.now() - started);
      })
      .catch(() => {
        failures++;
        latencies.push(performance.now() - started);
      })
      .finally(() => inFlight.delete(p));
    inFlight.add(p);
  };
  const timer = setInterval(probe, intervalMs);
  probe();
  return {
    async stop() {
      clearInterval(timer);
      await Promise.all(inFlight);
      return { ...latencySummary(latencies), failures, worstMs: Math.round(Math.max(0, ...latencies)) };
    },
  };
}
