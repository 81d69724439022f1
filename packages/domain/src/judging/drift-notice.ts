import { Build, Capture } from '@earmark/db';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { RecordDeps } from './record-verdict.js';
import { driftFlagsAt } from '../repositories/drift.js';
import { composeDriftMail } from '../mail/drift.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { buildMailSubscribersOf } from '../mail/recipients.js';

/**
 * After a verdict on the newest build of a branch: when this capture's cell newly drifts there
 * (flagged at this build, not at the previous build of the branch), subscribed members get one mail per check through the outbox.
 * Idempotent: a mail already written for this build, cell and check is not written again.
 * @returns the number of mails written
 */
export async function noteDrift(em: EntityManager, captureId: string, deps: RecordDeps): Promise<number> {
  const capture = await em.findOneOrFail(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
  const { build, project } = capture;
  if (!build.branch) return 0;
  // Drift is news about the head of a branch; re-judging an older build (re-evaluation) announces nothing.
  if (await em.count(Build, { project, branch: build.branch, createdAt: { $gt: build.createdAt } })) return 0;
  const cell = { testCase: capture.testCase.key, target: capture.target.key };
  const flags = await driftFlagsAt(em, project, build, cell);
  if (flags.length === 0) return 0;
  const before = await em.findOne(Build, { project, branch: build.branch, createdAt: { $lt: build.createdAt } }, { orderBy: { createdAt: 'desc' } });
  const earlier = before ? await driftFlagsAt(em, project, before, cell) : [];
  const fresh = flags.filter((f) => !earlier.some((e) => e.checkId === f.checkId));
  if (fresh.length === 0) return 0;
  const subscribers = await buildMailSubscribersOf(em, project);
  let written = 0;
  for (const flag of fresh) {
    const message = composeDriftMail({ project, build: { sha: build.sha, branch: build.branch }, flag, links: deps });
    const [seen] = await em.getConnection().execute<{ n: string }[]>(
      `select count(*) as n from notification where kind = 'drift' and payload @> ?::jsonb`,
      [JSON.stringify(message.payload)],
    );
    if (Number(seen?.n ?? 0) > 0) continue;
    written += writeToOutbox(em, message, subscribers);
  }
  await em.flush();
  return written;
}
