import type { ObjectStore } from '@earmark/platform';
import type { MikroORM } from '@mikro-orm/postgresql';

export interface ConsistencyAudit {
  captures: number;
  objects: number;
  /** Objects under a build's prefix with no capture row (an upload half-written). */
  orphanObjects: string[];
  /** Capture rows whose object is missing. */
  missingObjects: string[];
  /** Captures with more than one verdict (none is ever re-judged in these runs). */
  duplicateVerdicts: string[];
  /** Captures with no verdict. */
  unjudged: string[];
  /** Captures whose status is not final although they hold a verdict, or final without one. */
  statusMismatch: string[];
}

/** Rows, objects and verdicts of the builds `shas` of alpha-dsp, compared one by one. */
export async function auditConsistency(orm: MikroORM, objectStore: ObjectStore, shas: readonly string[]): Promise<ConsistencyAudit> {
  const rows = await orm.em.fork().getConnection().execute<{ id: string; object_key: string; status: string; verdicts: string }[]>(
    `select c.id, c.object_key, c.status, count(v.id) as verdicts
       from capture c join build b on b.id = c.build_id left join verdict v on v.capture_id = c.id
      where b.sha in (?) group by c.id`,
    [shas],
  );
  const objects = new Set<string>();
  for (const sha of new Set(shas)) for (const key of await objectStore.list(`captures/alpha-dsp/${sha}/`)) objects.add(key);
  const keys = new Set(rows.map((r) => r.object_key));
  return {
    captures: rows.length,
    objects: objects.size,
    orphanObjects: [...objects].filter((k) => !keys.has(k)),
    missingObjects: rows.filter((r) => !objects.has(r.object_key)).map((r) => r.id),
    duplicateVerdicts: rows.filter((r) => Number(r.verdicts) > 1).map((r) => r.id),
    unjudged: rows.filter((r) => Number(r.verdicts) === 0).map((r) => r.id),
    statusMismatch: rows.filter((r) => (Number(r.verdicts) > 0) !== (r.status === 'done' || r.status === 'error')).map((r) => r.id),
  };
}

/** Waits until every capture of `shas` has a verdict (or `timeoutMs` passes); returns how many have one. */
export async function waitForVerdicts(orm: MikroORM, shas: readonly string[], expected: number, timeoutMs: number): Promise<number> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const [row] = await orm.em.fork().getConnection().execute<{ n: string }[]>(
      `select count(distinct v.capture_id) as n from verdict v join capture c on c.id = v.capture_id join build b on b.id = c.build_id where b.sha in (?)`,
      [shas],
    );
    const judged = Number(row!.n);
    if (judged >= expected || Date.now() > deadline) return judged;
    await new Promise((r) => setTimeout(r, 500));
  }
}
