import { Counter, Gauge, type Registry } from 'prom-client';
import { withDeadline } from './deadline.js';

/** A scrape-time query gets this long; past it the gauge shows no series for that scrape. */
export const SCRAPE_QUERY_TIMEOUT_MS = 1_000;

const FAILURES = 'earmark_scrape_query_failures_total';

export interface ScrapeGaugeDef<L extends string> {
  name: string;
  help: string;
  labelNames: readonly L[];
  /** Reads the current values (one per label set); called on every scrape. */
  read: () => Promise<{ labels: Record<L, string>; value: number }[]>;
  timeoutMs?: number;
}

/**
 * A gauge whose values are read at scrape time (from the database). A read that fails or is
 * late leaves the gauge empty for that scrape, never stale, and counts in
 * earmark_scrape_query_failures_total{gauge}.
 */
export function registerScrapeGauge<L extends string>(registry: Registry, def: ScrapeGaugeDef<L>): Gauge<L> {
  const failures = (registry.getSingleMetric(FAILURES) as Counter<'gauge'> | undefined) ??
    new Counter({ name: FAILURES, help: 'Scrape-time queries that failed or ran out of time, by the gauge they feed (that gauge is empty for the scrape).', labelNames: ['gauge'], registers: [registry] });
  const timeoutMs = def.timeoutMs ?? SCRAPE_QUERY_TIMEOUT_MS;
  return new Gauge<L>({
    name: def.name,
    help: def.help,
    labelNames: def.labelNames,
    registers: [registry],
    async collect() {
      this.reset();
      try {
        for (const { labels, value } of await withDeadline(def.read(), timeoutMs, def.name)) this.set(labels as Partial<Record<L, string>>, value);
      } catch {
        failures.inc({ gauge: def.name });
      }
    },
  });
}
