import { Registry, collectDefaultMetrics } from 'prom-client';

/** Which of our processes a series comes from (the `process` label). */
export type MetricsProcessName = 'api' | 'worker';

/**
 * One registry per process: the runtime's default series (CPU, memory, event-loop lag, GC) under
 * `earmark_`, and on every series the process kind and the instance that serves it.
 * @param instanceName EARMARK_INSTANCE_NAME, or `hostname:pid`
 */
export function createMetricsRegistry(processName: MetricsProcessName, instanceName: string): Registry {
  const registry = new Registry();
  registry.setDefaultLabels({ process: processName, instance: instanceName });
  collectDefaultMetrics({ register: registry, prefix: 'earmark_' });
  return registry;
}
