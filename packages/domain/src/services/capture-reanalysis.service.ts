import { randomUUID } from 'node:crypto';
import type { ReanalyseResponse } from '@earmark/contracts';
import { Build, Capture, type Project, type User } from '@earmark/db';
import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import { ConflictError, NotFoundError, ServiceUnavailableError } from '../errors.js';
import type { JobProducer } from '../jobs/job-producer.js';
import { computeBuildStatus } from '../judging/build-aggregate.js';
import { assertAudioStored } from '../lifecycle/purged-capture.js';
import { recordAudit } from './audit.service.js';

/**
 * "Analyse again" from the capture page: the stored capture is judged anew under the mask in
 * force with the current engine, and the new verdict becomes the newest (the old one stays in
 * history). Useful after an analysis error (storage outage, worker crash) or a new mask.
 */
export class CaptureReanalysisService {
  constructor(private readonly jobs: JobProducer) {}

  /**
   * Queues the capture again and audits who asked.
   * @throws NotFoundError; GoneError (410) when its audio was purged; ConflictError while an analysis is already running;
   *   ServiceUnavailableError when the job queue refuses the job (the capture keeps its verdict)
   */
  async reanalyse(em: EntityManager, project: Project, id: string, user: User): Promise<ReanalyseResponse> {
    const capture = await em.findOne(Capture, { id, project }, { populate: ['build'] });
    if (!capture) throw new NotFoundError(`There is no capture ${id} in ${project.key}.`);
    assertAudioStored(capture);
    if (capture.status === 'queued' || capture.status === 'analysing') {
      throw new ConflictError(`Capture ${id} is already ${capture.status === 'queued' ? 'waiting to be analysed' : 'being analysed'}; its page shows the new verdict when it is ready.`, { code: 'analysis-in-progress' });
    }
    const before = capture.status;
    const reanalysisId = randomUUID();
    await this.setStatus(em, capture, 'queued', (tx) =>
      recordAudit(tx, { actor: `user:${user.email}`, action: 'capture.reanalyse', subject: `capture:${capture.id}`, project, details: { reanalysisId, statusBefore: before } }),
    );
    const jobId = await this.jobs.analyzeCapture({ captureId: capture.id, reanalysisId }).catch(() => null);
    if (!jobId) {
      await this.setStatus(em, capture, before);
      throw new ServiceUnavailableError('The analysis queue is unavailable right now; the capture keeps its verdict. Try again shortly.');
    }
    return { captureId: capture.id, status: 'queued', reanalysisId };
  }

  /** The capture's status and its build's aggregate, under the build's lock as the worker takes it. */
  private async setStatus(em: EntityManager, capture: Capture, status: Capture['status'], alsoInTransaction?: (tx: EntityManager) => void): Promise<void> {
    await em.transactional(async (tx) => {
      const build = await tx.findOneOrFail(Build, { id: capture.build.id }, { lockMode: LockMode.PESSIMISTIC_WRITE });
      const row = await tx.findOneOrFail(Capture, { id: capture.id }, { refresh: true });
      row.status = status;
      alsoInTransaction?.(tx);
      await tx.flush();
      build.status = await computeBuildStatus(tx, build.id);
    });
    capture.status = status;
  }
}
