import { QUEUES } from '@earmark/contracts';
import type { MikroORM } from '@mikro-orm/postgresql';
import type { Logger } from 'pino';
import { expireWaivers, type JobProducer } from '@earmark/domain';

/**
 * Safety net for the outbox pattern: captures whose job was never queued (the API could
 * not reach the queue) or got lost, and mail still pending, are queued again. Re-queuing
 * is harmless because verdicts are unique per capture and revision. Waivers past their
 * date expire here too (their mail goes out with the rest below).
 */
export async function sweep(orm: MikroORM, jobs: JobProducer, logger: Logger, olderThanSeconds: number): Promise<void> {
  const conn = orm.em.fork().getConnection();
  const orphans = await conn.execute<{ id: string }[]>(
    `select c.id from capture c
      where c.status = 'queued' and c.created_at < now() - make_interval(secs => ?)
        and not exists (select 1 from pgboss.job j
                         where j.name = ? and j.data->>'captureId' = c.id::text and j.state < 'completed')
      limit 100`,
    [olderThanSeconds, QUEUES.analyzeCapture],
  );
  for (const { id } of orphans) await jobs.analyzeCapture({ captureId: id });
  if (orphans.length) logger.warn({ count: orphans.length }, 're-queued captures without an analysis job');

  const expired = await expireWaivers(orm.em.fork());
  if (expired) logger.info({ count: expired }, 'waivers expired; findings re-opened');

  const [pending] = await conn.execute<{ n: string }[]>(`select count(*) as n from notification where state = 'pending'`);
  const waiting = await conn.execute<{ n: string }[]>(
    `select count(*) as n from pgboss.job where name = ? and state < 'completed'`,
    [QUEUES.sendNotifications],
  );
  if (Number(pending?.n ?? 0) > 0 && Number(waiting[0]?.n ?? 0) === 0) await jobs.sendMail('sweep');
}
