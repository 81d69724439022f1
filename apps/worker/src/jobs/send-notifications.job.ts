import { Notification } from '@earmark/db';
import type { MikroORM } from '@mikro-orm/postgresql';
import { LockMode } from '@mikro-orm/postgresql';
import type { Logger } from 'pino';
import type { Mailer } from '../mailer.js';

export interface NotifyDeps {
  orm: MikroORM;
  mailer: Mailer;
  logger: Logger;
}

/**
 * Sends pending mail from the outbox. Rows are claimed with SKIP LOCKED so several
 * workers never send one message twice; a failed send stays pending and the job throws,
 * so pg-boss retries with backoff (and the sweep re-queues it later still).
 * @throws when any message could not be sent
 */
export async function sendNotifications(deps: NotifyDeps): Promise<void> {
  let failures = 0;
  for (;;) {
    const sentInBatch = await deps.orm.em.fork().transactional(async (tx) => {
      const batch = await tx.find(
        Notification,
        { state: 'pending' },
        { orderBy: { createdAt: 'asc' }, limit: 20, lockMode: LockMode.PESSIMISTIC_PARTIAL_WRITE },
      );
      let sent = 0;
      for (const n of batch) {
        try {
          await deps.mailer.send({ to: n.recipient, subject: n.subject, text: n.body, html: n.html });
          n.state = 'sent';
          n.sentAt = new Date();
          sent += 1;
        } catch (error) {
          n.attempts += 1;
          n.lastError = error instanceof Error ? error.message : String(error);
          failures += 1;
          deps.logger.warn({ err: error, notification: n.id }, 'mail not sent; will retry');
          break; // the server is likely down: keep the rest for the retry
        }
      }
      await tx.flush();
      return { sent, batch: batch.length };
    });
    if (failures > 0) throw new Error(`${failures} message(s) could not be sent`);
    if (sentInBatch.batch < 20) return;
  }
}
