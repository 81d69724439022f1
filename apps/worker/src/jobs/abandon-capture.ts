import { Capture } from '@earmark/db';
import { errorJudgement, maskInForce, recordVerdict, type JobProducer, type RecordDeps } from '@earmark/domain';
import { ENGINE_VERSION } from '@earmark/dsp';
import type { MikroORM } from '@mikro-orm/postgresql';
import type { JudgingMetrics } from '../worker-metrics.js';

/**
 * Ends a capture that could not be analysed in an `error` verdict under the mask in force, so
 * it never stays queued or analysing. Used by the dead-letter handler and, as a last resort, the sweep.
 * @returns false when the capture no longer exists
 */
export async function judgeAbandoned(
  orm: MikroORM,
  captureId: string,
  reason: string,
  deps: { links: RecordDeps; jobs: JobProducer; judging?: JudgingMetrics },
): Promise<boolean> {
  const em = orm.em.fork();
  const capture = await em.findOne(Capture, { id: captureId }, { populate: ['testCase', 'target'] });
  if (!capture) return false;
  const mask = await maskInForce(em, capture.testCase, capture.target);
  const recorded = await recordVerdict(em, captureId, mask, errorJudgement(reason, ENGINE_VERSION), deps.links);
  if (recorded.written) deps.judging?.verdictRecorded('error');
  // This error may complete a build: its failure mail goes out now rather than at the next sweep.
  if (recorded.notificationsQueued > 0) await deps.jobs.sendMail('build failed');
  return true;
}
