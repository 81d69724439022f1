import type { EntityManager } from '@mikro-orm/postgresql';
import { ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import type { Logger } from 'pino';
import { plotPrefixOf } from '../plots/plot-store.js';
import { newestVerdictSql } from '../repositories/verdicts.js';
import { mapSettledLimited } from '../util/map-limited.js';

/** How long captures keep their audio, by their build's result; 0 keeps it forever. */
export interface RetentionPolicy {
  /** Days for the captures of a build that passed with no waiver. */
  passedDays: number;
  /** Days for the captures of a build that failed, errored, is still open, or passed only through a waiver. */
  failedDays: number;
}

export interface RetentionOptions {
  /** Captures purged per transaction. */
  batchSize?: number;
  /** Batches per run; the next run carries on (bounds one run's time). */
  maxBatches?: number;
  /** Object-store requests in flight at once. */
  concurrency?: number;
  now?: Date;
}

export interface RetentionResult {
  /** Captures whose audio and plots were deleted and whose row is marked purged. */
  purged: number;
  /** Plot objects deleted with them. */
  plotsDeleted: number;
  /** Captures whose objects could not be deleted this run (tried again next run). */
  failed: number;
}

const DAY_MS = 24 * 3600 * 1000;

/** The creation time a build must be older than for its captures to be purged; '-infinity' when kept forever. */
export function retentionCutoff(days: number, now: Date): Date | '-infinity' {
  return days > 0 ? new Date(now.getTime() - days * DAY_MS) : '-infinity';
}

// A build "passed" for retention when its status is pass and no capture of it passed only
// through a waiver (the covering waivers are the part of the newest verdict's basis before ';').
const PASSED_WITHOUT_WAIVER = `(b.status = 'pass' and not exists (
      select 1 from capture w where w.build_id = b.id
         and split_part(coalesce(${newestVerdictSql('w.id', 'waiver_basis')}, ''), ';', 1) <> ''))`;

// The newest passing capture of its test case and target: the capture page of every later
// capture draws it as the "last passing" overlay, so its audio (and plots) stay. The newest pass
// is found the way the overlay finds it (LAST_PASSING_SQL): the project's builds newest first on
// (project_id, created_at desc), stopping at the first pass; a capture of that build is kept.
const LAST_PASS = `(c.status = 'done' and ${newestVerdictSql('c.id')} = 'pass' and b.created_at >= (
      select nb.created_at from capture n join build nb on nb.id = n.build_id
       where nb.project_id = b.project_id and n.test_case_id = c.test_case_id and n.target_id = c.target_id
         and n.status = 'done' and ${newestVerdictSql('n.id')} = 'pass'
       order by nb.created_at desc limit 1))`;

/**
 * SQL: the next captures whose audio the policy removes, locked (SKIP LOCKED, so workers running
 * it at once take different rows). No ORDER BY: the scan stops at the batch size instead of
 * judging every old capture to sort them (11.6 s a batch on 40,000 captures with it). Parameters: the later of the two cutoffs,
 * the passed cutoff, the failed cutoff, the batch size. Kept whatever their age:
 * - captures still queued or being analysed;
 * - golden captures: any mask revision derived its limits from them (`derivation.captureIds`);
 * - captures with a finding still under review (open, investigating) or a waiver requested on one;
 * - the last passing capture of each test case and target (the overlay of every later capture).
 * Age is the later of the build's and the capture's: a capture uploaded today into an old build (a CI re-run) is young.
 */
export const RETENTION_CANDIDATES_SQL = `select c.id, c.object_key
   from capture c join build b on b.id = c.build_id
  where c.purged_at is null
    and c.status in ('done', 'error')
    and b.created_at < ?::timestamptz
    and greatest(b.created_at, c.created_at) < (case when ${PASSED_WITHOUT_WAIVER} then ?::timestamptz else ?::timestamptz end)
    and not exists (select 1 from mask_revision mr where mr.derivation -> 'captureIds' @> to_jsonb(c.id::text))
    and not exists (select 1 from finding f where f.capture_id = c.id
                       and (f.state in ('open', 'investigating') or exists (select 1 from waiver wv where wv.finding_id = f.id and wv.state = 'requested')))
    and not ${LAST_PASS}
  limit ?
  for update of c skip locked`;

/**
 * Applies the retention policy: for each capture past its limit, deletes its stored audio and
 * every stored plot, then marks the row `purged_at`. Rows, verdicts, check results and findings
 * stay, so every number the gate showed stays. Objects go first and the row after, in the
 * transaction that holds the row's lock: an object deleted whose row update then failed is simply
 * deleted again (a no-op) by the next run. Idempotent: purged rows are never selected again.
 * @param em a root EntityManager; each batch runs in its own fork and transaction
 * @throws ObjectStoreUnavailableError after marking what was done, so the job retries later
 */
export async function applyRetention(em: EntityManager, objectStore: ObjectStore, logger: Logger, policy: RetentionPolicy, options: RetentionOptions = {}): Promise<RetentionResult> {
  const result: RetentionResult = { purged: 0, plotsDeleted: 0, failed: 0 };
  if (policy.passedDays <= 0 && policy.failedDays <= 0) return result;
  const now = options.now ?? new Date();
  const batchSize = options.batchSize ?? 200;
  const [passed, failed] = [retentionCutoff(policy.passedDays, now), retentionCutoff(policy.failedDays, now)];
  // The later cutoff first: a plain range on the build's age that leaves out every recent build at once.
  const cutoffs = [latest(passed, failed), passed, failed];
  let storeDown: unknown = null;

  for (let batch = 0; batch < (options.maxBatches ?? 50) && !storeDown; batch++) {
    const { selected, purged } = await em.fork().transactional(async (tx) => {
      const conn = tx.getConnection();
      const rows = await conn.execute<{ id: string; object_key: string }[]>(RETENTION_CANDIDATES_SQL, [...cutoffs, batchSize], 'all', tx.getTransactionContext());
      const settled = await mapSettledLimited(rows, options.concurrency ?? 8, async (row) => {
        await objectStore.delete(row.object_key);
        return deletePlots(objectStore, row.id);
      });
      const done: string[] = [];
      settled.forEach((s, i) => {
        if (s.status === 'fulfilled') {
          done.push(rows[i]!.id);
          result.plotsDeleted += s.value;
        } else {
          result.failed += 1;
          if (s.reason instanceof ObjectStoreUnavailableError) storeDown = s.reason;
          else logger.warn({ err: s.reason, captureId: rows[i]!.id }, 'could not delete the objects of a capture past retention; next run tries again');
        }
      });
      if (done.length) await conn.execute(`update capture set purged_at = ? where id = any(?::uuid[])`, [now, `{${done.join(',')}}`], 'run', tx.getTransactionContext());
      result.purged += done.length;
      return { selected: rows.length, purged: done.length };
    });
    // The last batch, or one whose every capture failed (they would only be selected again).
    if (selected < batchSize || purged === 0) break;
  }
  if (storeDown) throw storeDown;
  return result;
}

const latest = (a: Date | '-infinity', b: Date | '-infinity') => (a === '-infinity' ? b : b === '-infinity' ? a : a > b ? a : b);

/** Deletes every stored plot of a capture; @returns how many */
async function deletePlots(objectStore: ObjectStore, captureId: string): Promise<number> {
  let deleted = 0;
  for await (const page of objectStore.listPages(plotPrefixOf(captureId))) {
    for (const object of page) {
      await objectStore.delete(object.key);
      deleted += 1;
    }
  }
  return deleted;
}
