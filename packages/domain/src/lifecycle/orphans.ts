import type { EntityManager } from '@mikro-orm/postgresql';
import type { ObjectStore, StoredObject } from '@earmark/platform';
import { PLOT_CACHE_PREFIX } from '../plots/plot-store.js';

/** Where ingest stores capture audio (`captures/<project>/<sha>/<capture id>.<ext>`). */
export const CAPTURE_OBJECT_PREFIX = 'captures/';

export interface OrphanOptions {
  /** Objects younger than this are never touched: an upload may be between storing its object and committing its row. */
  graceHours: number;
  now?: Date;
}

export interface OrphanResult {
  /** Objects looked at under `captures/` and `plot-cache/`. */
  listed: number;
  /** Capture objects no stored capture row holds, deleted. */
  captureObjectsDeleted: number;
  /** Plots of captures that no longer exist (or whose audio was purged), deleted. */
  plotObjectsDeleted: number;
}

const placeholders = (values: readonly unknown[]) => values.map(() => '?').join(',');

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * Deletes objects no row accounts for, older than the grace period:
 * - capture audio whose row never committed (the upload stored the object, then the database
 *   failed and the compensating delete failed too, or the process died in between), or whose row
 *   says it was purged;
 * - plots of captures that were deleted (a project removed) or purged (a plot drawn while the
 *   retention run deleted the capture's others).
 * Walks the store a page at a time, one indexed query per page.
 */
export async function cleanOrphans(em: EntityManager, objectStore: ObjectStore, options: OrphanOptions): Promise<OrphanResult> {
  const olderThan = (options.now ?? new Date()).getTime() - options.graceHours * 3600 * 1000;
  const old = (page: StoredObject[]) => page.filter((o) => o.lastModified.getTime() < olderThan);
  const conn = em.fork().getConnection();
  const result: OrphanResult = { listed: 0, captureObjectsDeleted: 0, plotObjectsDeleted: 0 };

  for await (const page of objectStore.listPages(CAPTURE_OBJECT_PREFIX)) {
    result.listed += page.length;
    const candidates = old(page);
    if (candidates.length === 0) continue;
    const held = await conn.execute<{ object_key: string }[]>(`select object_key from capture where object_key in (${placeholders(candidates)}) and purged_at is null`, candidates.map((o) => o.key));
    const heldKeys = new Set(held.map((r) => r.object_key));
    for (const object of candidates) {
      if (heldKeys.has(object.key)) continue;
      await objectStore.delete(object.key);
      result.captureObjectsDeleted += 1;
    }
  }

  for await (const page of objectStore.listPages(PLOT_CACHE_PREFIX)) {
    result.listed += page.length;
    // plot-cache/<capture id>/<plot>.json; a key of another shape is not ours to judge.
    const candidates = old(page).flatMap((o) => {
      const captureId = o.key.slice(PLOT_CACHE_PREFIX.length).split('/')[0] ?? '';
      return UUID.test(captureId) ? [{ key: o.key, captureId }] : [];
    });
    if (candidates.length === 0) continue;
    const ids = [...new Set(candidates.map((c) => c.captureId))];
    const live = await conn.execute<{ id: string }[]>(`select id from capture where id in (${placeholders(ids)}) and purged_at is null`, ids);
    const liveIds = new Set(live.map((r) => r.id));
    for (const plot of candidates) {
      if (liveIds.has(plot.captureId)) continue;
      await objectStore.delete(plot.key);
      result.plotObjectsDeleted += 1;
    }
  }
  return result;
}
