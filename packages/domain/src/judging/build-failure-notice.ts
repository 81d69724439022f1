import type { EntityManager } from '@mikro-orm/postgresql';
import { Capture, CheckResult, type Build, type Project } from '@earmark/db';
import { composeBuildFailedMail, type BuildFailedInput, type ReportedCell, type ReportedCheck } from '../mail/build-failed.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { buildMailSubscribersOf } from '../mail/recipients.js';
import { newestVerdicts } from '../repositories/verdicts.js';

const str = (v: unknown) => (typeof v === 'string' ? v : null);
const waivedUntil = (details: Record<string, unknown>) => {
  const waived = details.waived;
  return typeof waived === 'object' && waived !== null ? str((waived as Record<string, unknown>).until) : null;
};

/**
 * Every capture of the build with its newest verdict and the checks that did not simply pass
 * (failing, unmeasurable, or passed with a waiver), in upload order. Runs inside the caller's
 * transaction so the verdict just written is part of it.
 */
export async function reportedCells(em: EntityManager, build: Build): Promise<ReportedCell[]> {
  const captures = await em.find(Capture, { build }, { populate: ['testCase', 'target'], orderBy: { createdAt: 'asc', id: 'asc' } });
  const newest = await newestVerdicts(em, captures.map((c) => c.id), []);
  const results = newest.size ? await em.find(CheckResult, { verdict: { $in: [...newest.values()].map((v) => v.id) }, pass: false }, { orderBy: { checkId: 'asc' } }) : [];
  const byVerdict = new Map<string, ReportedCheck[]>();
  for (const r of results) {
    const list = byVerdict.get(r.verdict.id) ?? [];
    list.push({
      id: r.checkId,
      label: str(r.details.label),
      measured: r.measured,
      limit: r.limit,
      margin: r.margin,
      unit: str(r.details.unit),
      worstHz: r.worstHz,
      error: str(r.details.error),
      waivedUntil: waivedUntil(r.details),
    });
    byVerdict.set(r.verdict.id, list);
  }
  return captures.flatMap((c) => {
    const verdict = newest.get(c.id);
    if (!verdict) return [];
    return [{ testCase: c.testCase.key, target: c.target.key, captureId: c.id, outcome: verdict.outcome, reason: verdict.reason, checks: byVerdict.get(verdict.id) ?? [] }];
  });
}

/** A build is announced once, even when a later re-judgement sends it back to pending and it fails again. */
async function alreadyAnnounced(em: EntityManager, project: string, sha: string): Promise<boolean> {
  const rows = await em
    .getConnection()
    .execute<{ n: string }[]>(
      `select count(*) as n from notification where kind = 'build-failed' and payload->>'project' = ? and payload->>'sha' = ?`,
      [project, sha],
      'all',
      em.getTransactionContext(),
    );
  return Number(rows[0]?.n ?? 0) > 0;
}

/**
 * Call after a verdict is written and the build's status recomputed, in the same transaction
 * (under the build's row lock, so the decision is taken once). When the status is final and
 * `fail` or `error` — no capture queued or being analysed — the project's subscribers get one
 * mail describing the whole build, whichever capture completed it.
 * @returns the number of outbox rows written
 */
export async function noteBuildFailure(em: EntityManager, build: Build, project: Project, links: BuildFailedInput['links']): Promise<number> {
  const status = build.status;
  if (status !== 'fail' && status !== 'error') return 0;
  if (await alreadyAnnounced(em, project.key, build.sha)) return 0;
  const recipients = await buildMailSubscribersOf(em, project);
  if (!recipients.some((u) => !u.disabled)) return 0;
  const message = composeBuildFailedMail({ project, build, status, cells: await reportedCells(em, build), links });
  return writeToOutbox(em, message, recipients);
}
