import type { EntityManager } from '@mikro-orm/postgresql';
import { STORAGE_QUOTA_EXCEEDED, mebibytes } from '@earmark/contracts';
import type { Project } from '@earmark/db';
import { QuotaExceededError } from '../errors.js';

/** The quota a project is held to, and where it comes from. */
export interface EffectiveQuota {
  /** Bytes; null: unlimited. */
  bytes: number | null;
  source: 'project' | 'default';
}

/**
 * The project's own quota when it has one (0: unlimited for this project), else the server's
 * default (EARMARK_PROJECT_QUOTA_BYTES; 0 or unset: unlimited).
 */
export function effectiveQuota(project: Pick<Project, 'storageQuotaBytes'>, defaultBytes: number | undefined): EffectiveQuota {
  if (project.storageQuotaBytes !== null) return { bytes: project.storageQuotaBytes > 0 ? project.storageQuotaBytes : null, source: 'project' };
  return { bytes: defaultBytes && defaultBytes > 0 ? defaultBytes : null, source: 'default' };
}

/**
 * Bytes of capture audio each project stores now: captures whose audio was purged no longer
 * count. One index-only sum per project (`capture_stored_size_idx`).
 */
export async function storageUsedBytes(em: EntityManager, projectIds: readonly string[]): Promise<Map<string, number>> {
  if (projectIds.length === 0) return new Map();
  const rows = await em.getConnection().execute<{ project_id: string; used: string | null }[]>(
    `select p.id as project_id, (select sum(c.size_bytes) from capture c where c.project_id = p.id and c.purged_at is null) as used
       from project p where p.id = any(?::uuid[])`,
    [`{${projectIds.join(',')}}`],
    'all',
    em.getTransactionContext(),
  );
  return new Map(rows.map((r) => [r.project_id, Number(r.used ?? 0)]));
}

/** First key of the quota's advisory locks (the second is the project's hash), so no other lock of ours collides. */
const QUOTA_LOCK_SPACE = 0x45514d51;

/**
 * Refuses an upload that would take the project past its quota.
 *
 * Outside a transaction it is the cheap early answer, before anything is decoded or stored.
 * Inside the transaction that inserts the capture (`locked`), it first takes the project's
 * transaction-scoped advisory lock, so uploads to one project pass check and insert one at a
 * time and the quota holds exactly; other projects take other locks and never wait. Projects
 * without a quota take no lock.
 * @throws QuotaExceededError (413 storage-quota-exceeded) naming used, quota and capture size
 */
export async function assertWithinQuota(em: EntityManager, project: Project, captureBytes: number, defaultBytes: number | undefined, options: { locked?: boolean } = {}): Promise<void> {
  const quota = effectiveQuota(project, defaultBytes);
  if (quota.bytes === null) return;
  if (options.locked) {
    // Held until the caller's transaction commits or rolls back: the next upload's sum sees this one's row.
    await em.getConnection().execute('select pg_advisory_xact_lock(?, hashtext(?))', [QUOTA_LOCK_SPACE, project.id], 'all', em.getTransactionContext());
  }
  const used = (await storageUsedBytes(em, [project.id])).get(project.id) ?? 0;
  if (used + captureBytes <= quota.bytes) return;
  throw new QuotaExceededError(
    `Project ${project.key} stores ${mebibytes(used)} of its ${mebibytes(quota.bytes)} storage quota; this capture (${mebibytes(captureBytes)}) would exceed it, so nothing was stored. ` +
      'An administrator can raise the quota, or the retention policy frees space as old captures age out.',
    STORAGE_QUOTA_EXCEEDED,
  );
}
