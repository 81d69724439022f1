import type { EntityManager } from '@mikro-orm/postgresql';
import { CAPTURE_PURGED, ImpactResult, type CreateImpactRunRequest, type ImpactRunDto, type ReevaluateRequest, type ReevaluateResponse } from '@earmark/contracts';
import { ImpactRun, MaskRevision, type Project, type TestCase, type User } from '@earmark/db';
import type { JobProducer } from '../jobs/job-producer.js';
import { capturesGovernedBy, recentBuilds } from '../repositories/masks.js';
import { ENGINE_VERSION } from '@earmark/dsp';
import { ConflictError, GoneError, NotFoundError, ServiceUnavailableError } from '../errors.js';
import { recordAudit } from './audit.service.js';

export function toImpactRunDto(run: ImpactRun): ImpactRunDto {
  const result = run.state === 'done' && run.result ? ImpactResult.safeParse(run.result) : null;
  return {
    id: run.id,
    testCase: run.maskRevision.testCase.key,
    revision: run.maskRevision.revision,
    builds: run.builds,
    state: run.state,
    progress: run.progress,
    total: run.total,
    requestedBy: run.requestedBy.email,
    createdAt: run.createdAt.toISOString(),
    finishedAt: run.finishedAt?.toISOString() ?? null,
    error: run.error,
    result: result?.success ? result.data : null,
  };
}

/** Impact runs of a revision over past builds, and re-evaluation under an approved revision. */
export class ImpactService {
  constructor(private readonly jobs: JobProducer) {}

  private async revision(em: EntityManager, testCase: TestCase, revision: number): Promise<MaskRevision> {
    const mask = await em.findOne(MaskRevision, { testCase, revision }, { populate: ['testCase', 'target'] });
    if (!mask) throw new NotFoundError(`Test case ${testCase.key} has no mask revision ${revision}.`);
    return mask;
  }

  /** Creates the run and queues it; the worker fills in progress and the result. */
  async start(em: EntityManager, project: Project, testCase: TestCase, revision: number, req: CreateImpactRunRequest, user: User): Promise<ImpactRun> {
    const mask = await this.revision(em, testCase, revision);
    const run = em.create(ImpactRun, { maskRevision: mask, requestedBy: user, builds: req.builds });
    recordAudit(em, { actor: `user:${user.email}`, action: 'mask.impact', subject: `mask:${testCase.key}#${revision}`, project, details: { builds: req.builds } });
    await em.flush();
    const jobId = await this.jobs.evaluateImpact({ impactRunId: run.id }).catch(() => null);
    if (!jobId) {
      run.state = 'error';
      run.error = 'The job queue could not be reached; start the impact run again.';
      await em.flush();
      throw new ServiceUnavailableError('The job queue is unavailable right now; try again shortly.');
    }
    return run;
  }

  async get(em: EntityManager, testCase: TestCase, revision: number, runId: string): Promise<ImpactRun> {
    const run = await em.findOne(ImpactRun, { id: runId, maskRevision: { testCase, revision } }, { populate: ['maskRevision', 'maskRevision.testCase', 'requestedBy'] });
    if (!run) throw new NotFoundError(`Revision ${revision} of ${testCase.key} has no impact run ${runId}.`);
    return run;
  }

  /** The revision's runs, newest first (the last 20). */
  list(em: EntityManager, testCase: TestCase, revision: number): Promise<ImpactRun[]> {
    return em.find(ImpactRun, { maskRevision: { testCase, revision } }, { populate: ['maskRevision', 'maskRevision.testCase', 'requestedBy'], orderBy: { createdAt: 'desc' }, limit: 20 });
  }

  /**
   * Queues an analysis under this approved revision for each governed capture of the selected
   * builds that has no verdict under it yet; the worker links each new verdict to the one it
   * replaces and recomputes the build's status.
   * @throws ConflictError unless the revision is approved
   */
  async reevaluate(em: EntityManager, project: Project, testCase: TestCase, revision: number, req: ReevaluateRequest, user: User): Promise<ReevaluateResponse> {
    const mask = await this.revision(em, testCase, revision);
    if (mask.state !== 'approved') throw new ConflictError(`Revision ${revision} is ${mask.state}; only the approved revision in force can re-evaluate builds.`);
    const builds = await recentBuilds(em, project, testCase, req.scope, req.builds ?? 20);
    const governed = await capturesGovernedBy(em, mask, builds.map((b) => b.id));
    // Captures whose audio the retention policy removed keep their verdicts; they cannot be judged again.
    const captures = governed.filter((c) => !c.purged);
    const purged = governed.length - captures.length;
    if (governed.length > 0 && captures.length === 0) {
      throw new GoneError(`The audio of all ${purged} selected captures was removed by the retention policy; their verdicts are kept, and none can be re-evaluated.`, CAPTURE_PURGED);
    }
    // Judged already by this revision with this engine: nothing would change. A verdict of an
    // older engine is judged again, so a new engine's numbers reach past builds.
    const judged = await em
      .getConnection()
      .execute<{ capture_id: string }[]>(`select capture_id from verdict where mask_revision_id = ? and engine_version = ? and capture_id = any(?::uuid[])`, [mask.id, ENGINE_VERSION, `{${captures.map((c) => c.id).join(',')}}`]);
    const skip = new Set(judged.map((j) => j.capture_id));
    const todo = captures.filter((c) => !skip.has(c.id)).map((c) => c.id);
    if (todo.length > 0) {
      const ids = await Promise.all(todo.map((captureId) => this.jobs.analyzeCapture({ captureId, maskRevisionId: mask.id }).catch(() => null)));
      if (ids.some((id) => !id)) throw new ServiceUnavailableError('The job queue is unavailable right now; try again shortly.');
    }
    recordAudit(em, { actor: `user:${user.email}`, action: 'mask.reevaluate', subject: `mask:${testCase.key}#${revision}`, project, details: { scope: req.scope, builds: builds.length, queued: todo.length, purged } });
    await em.flush();
    return { revision, builds: builds.length, queued: todo.length, captureIds: todo, purged };
  }
}
