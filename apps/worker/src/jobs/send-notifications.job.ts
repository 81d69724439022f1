import { Notification } from '@earmark/db';
import type { MikroORM } from '@mikro-orm/postgresql';
import { LockMode } from '@mikro-orm/postgresql';
import type { Logger } from 'pino';
import type { Mailer } from '../mailer.js';
import { classifyMailFailure, mailRetryDelayMs } from './mail-failure.js';

export interface NotifyDeps {
  orm: MikroORM;
  mailer: Mailer;
  logger: Logger;
  /** Attempts at one message before it is marked `failed` (EARMARK_MAIL_MAX_ATTEMPTS). */
  maxAttempts: number;
  /** Wait after the first refusal; doubles with each further one. */
  retryBaseMs?: number;
  /** The clock (tests move it forward). */
  now?: () => Date;
}

const BATCH = 20;

/**
 * Sends due mail from the outbox. Rows are claimed with SKIP LOCKED so several workers never
 * send one message twice. A message the relay refuses is charged an attempt and waits (back-off)
 * while the rest of the batch still goes out; after `maxAttempts` it is marked `failed`. When the
 * relay itself is unreachable the run stops, charges nothing and throws, so pg-boss retries the
 * job with back-off (and the sweep wakes it again later still).
 * @throws when the relay could not be reached
 */
export async function sendNotifications(deps: NotifyDeps): Promise<void> {
  const now = deps.now ?? (() => new Date());
  const retryBaseMs = deps.retryBaseMs ?? 60_000;
  for (;;) {
    const run = await deps.orm.em.fork().transactional(async (tx) => {
      const batch = await tx.find(
        Notification,
        { state: 'pending', $or: [{ nextAttemptAt: null }, { nextAttemptAt: { $lte: now() } }] },
        { orderBy: { createdAt: 'asc' }, limit: BATCH, lockMode: LockMode.PESSIMISTIC_PARTIAL_WRITE },
      );
      let relayError: unknown;
      for (const n of batch) {
        try {
          await deps.mailer.send({ to: n.recipient, subject: n.subject, text: n.body, html: n.html });
          n.state = 'sent';
          n.sentAt = now();
          n.nextAttemptAt = null;
        } catch (error) {
          n.lastError = error instanceof Error ? error.message : String(error);
          if (classifyMailFailure(error) === 'relay') {
            relayError = error;
            break; // every other message would fail the same way: keep them for the job's retry
          }
          n.attempts += 1;
          if (n.attempts >= deps.maxAttempts) {
            n.state = 'failed';
            n.nextAttemptAt = null;
            deps.logger.error({ err: error, notification: n.id, attempts: n.attempts }, 'mail refused; giving up');
          } else {
            n.nextAttemptAt = new Date(now().getTime() + mailRetryDelayMs(n.attempts, retryBaseMs));
            deps.logger.warn({ err: error, notification: n.id, attempts: n.attempts, retryAt: n.nextAttemptAt }, 'mail refused; will retry');
          }
        }
      }
      await tx.flush();
      return { relayError, size: batch.length };
    });
    if (run.relayError) throw new Error('The mail relay could not be reached; pending mail stays queued.', { cause: run.relayError });
    if (run.size < BATCH) return;
  }
}
