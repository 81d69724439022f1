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
/** How long a claimed message stays hidden from other workers; a worker killed while sending frees its claim after it. */
const CLAIM_MS = 120_000;

type Claimed = Pick<Notification, 'id' | 'recipient' | 'subject' | 'body' | 'html' | 'attempts'>;

/**
 * Sends due mail from the outbox, at least once and as close to exactly once as SMTP allows:
 * a batch is claimed in a short transaction of its own (SKIP LOCKED, then hidden from other
 * workers for CLAIM_MS), and each message is marked sent in its own transaction right after the
 * relay accepted it. A worker killed mid-batch can therefore repeat at most the one message it
 * was sending when it died (its Message-ID is the same, so mail clients fold the two); the rest
 * of its claim is sent by another worker once the claim lapses. A message the relay refuses is
 * charged an attempt and waits (back-off); after `maxAttempts` it is marked `failed`. When the
 * relay itself is unreachable the run releases its claim, charges nothing and throws, so pg-boss
 * retries the job with back-off (and the sweep wakes it again later still).
 * @throws when the relay could not be reached
 */
export async function sendNotifications(deps: NotifyDeps): Promise<void> {
  const now = deps.now ?? (() => new Date());
  const retryBaseMs = deps.retryBaseMs ?? 60_000;
  for (;;) {
    const { batch, claimedUntil } = await claimBatch(deps, now());
    for (const [index, n] of batch.entries()) {
      // A slow relay can outlast the claim: another worker may then have claimed this message.
      // Renewing it, only if it is still ours, keeps each message with one sender.
      if (!(await renewClaim(deps, n.id, claimedUntil, new Date(now().getTime() + CLAIM_MS)))) continue;
      try {
        await deps.mailer.send({ to: n.recipient, subject: n.subject, text: n.body, html: n.html, messageKey: n.id });
        await update(deps, n.id, { state: 'sent', sentAt: now(), nextAttemptAt: null });
      } catch (error) {
        const lastError = error instanceof Error ? error.message : String(error);
        if (classifyMailFailure(error) === 'relay') {
          // Every other message would fail the same way: hand the unsent ones back at once, uncharged.
          await update(deps, n.id, { lastError, nextAttemptAt: null });
          for (const rest of batch.slice(index + 1)) await update(deps, rest.id, { nextAttemptAt: null });
          throw new Error('The mail relay could not be reached; pending mail stays queued.', { cause: error });
        }
        const attempts = n.attempts + 1;
        if (attempts >= deps.maxAttempts) {
          await update(deps, n.id, { lastError, attempts, state: 'failed', nextAttemptAt: null });
          deps.logger.error({ err: error, notification: n.id, attempts }, 'mail refused; giving up');
        } else {
          const retryAt = new Date(now().getTime() + mailRetryDelayMs(attempts, retryBaseMs));
          await update(deps, n.id, { lastError, attempts, nextAttemptAt: retryAt });
          deps.logger.warn({ err: error, notification: n.id, attempts, retryAt }, 'mail refused; will retry');
        }
      }
    }
    if (batch.length < BATCH) return;
  }
}

/** Claims up to BATCH due messages for this worker alone, committed before anything is sent. */
async function claimBatch(deps: NotifyDeps, at: Date): Promise<{ batch: Claimed[]; claimedUntil: Date }> {
  const claimedUntil = new Date(at.getTime() + CLAIM_MS);
  const batch = await deps.orm.em.fork().transactional(async (tx) => {
    const rows = await tx.find(
      Notification,
      { state: 'pending', $or: [{ nextAttemptAt: null }, { nextAttemptAt: { $lte: at } }] },
      { orderBy: { createdAt: 'asc' }, limit: BATCH, lockMode: LockMode.PESSIMISTIC_PARTIAL_WRITE },
    );
    for (const n of rows) n.nextAttemptAt = claimedUntil;
    await tx.flush();
    return rows.map(({ id, recipient, subject, body, html, attempts }) => ({ id, recipient, subject, body, html, attempts }));
  });
  return { batch, claimedUntil };
}

/** Extends this worker's claim on one message; false when the claim is no longer this worker's. */
async function renewClaim(deps: NotifyDeps, id: string, claimedUntil: Date, until: Date): Promise<boolean> {
  const changed = await deps.orm.em.fork().nativeUpdate(Notification, { id, state: 'pending', nextAttemptAt: claimedUntil }, { nextAttemptAt: until });
  return changed === 1;
}

async function update(deps: NotifyDeps, id: string, fields: Partial<Pick<Notification, 'state' | 'sentAt' | 'nextAttemptAt' | 'attempts' | 'lastError'>>): Promise<void> {
  await deps.orm.em.fork().nativeUpdate(Notification, { id }, fields);
}
