import { registerQueueGauges, registerScrapeGauge, type Registry, type RunSql } from '@earmark/platform';

// `sent` only ever grows (it is history, not depth), so it is not counted on every scrape.
const OUTBOX_SQL = `
  select s.status, count(n.id)::float8 as messages
    from (values ('pending'), ('failed')) as s(status)
    left join notification n on n.state = s.status
   group by s.status`;

/**
 * The scrape-time gauges both processes serve, read from the database: the job queues
 * (earmark_queue_depth, earmark_queue_oldest_age_seconds) and the mail outbox.
 */
export function registerSharedGauges(registry: Registry, sql: RunSql, timeoutMs?: number): void {
  registerQueueGauges(registry, sql, timeoutMs);
  registerScrapeGauge(registry, {
    name: 'earmark_mail_outbox_depth',
    help: 'Outbox messages by status (pending: still to send, some backing off; failed: given up after the last attempt). Read from the database at scrape time: the same value from every process (take max, not sum).',
    labelNames: ['status'],
    timeoutMs,
    read: async () => (await sql<{ status: string; messages: number }>(OUTBOX_SQL)).map((r) => ({ labels: { status: r.status }, value: Number(r.messages) })),
  });
}
