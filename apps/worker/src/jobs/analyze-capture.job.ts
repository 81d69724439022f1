import { AnalyzeCaptureJob, type VerdictOutcome } from '@earmark/contracts';
import { Build, Capture, MaskRevision } from '@earmark/db';
import { ComputePoolBusyError, ComputeThreadError, ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import { ENGINE_VERSION } from '@earmark/dsp';
import { LockMode, type MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { computeBuildStatus, errorJudgement, writeStoredPlot, maskInForce, noteDrift, recordVerdict, type AnalysisPhases, type JobProducer, type RecordDeps, type RecordResult } from '@earmark/domain';
import { judgeInThread, type AnalysisSlots } from './judge-in-thread.js';
import { startJobSteps } from './job-steps.js';
import type { JudgingMetrics } from '../worker-metrics.js';

export interface AnalyzeDeps {
  orm: MikroORM;
  objectStore: ObjectStore;
  jobs: JobProducer;
  logger: Logger;
  links: RecordDeps;
  maxAttempts: number;
  /** Fault injection for recovery tests (EARMARK_ANALYSIS_DELAY_MS); 0 in production. */
  delayMs: number;
  /** Where the engine runs: never on this event loop, which also serves the other slots' jobs. */
  analysis: AnalysisSlots;
  /** Verdicts and analysis times for the metrics port (absent in tests that do not look). */
  judging?: JudgingMetrics;
}

/**
 * One capture: load, analyse against the mask in force (in an analysis thread), record the
 * verdict. Transient faults (object store, database, a busy pool or a thread that crashed)
 * throw so pg-boss retries with backoff; from the last attempt on, the capture is judged
 * `error` so no job stays stuck.
 */
export async function analyzeCapture(job: PgBoss.JobWithMetadata<unknown>, deps: AnalyzeDeps): Promise<void> {
  const { captureId, maskRevisionId, reanalysisId } = AnalyzeCaptureJob.parse(job.data);
  // A person's "analyse again": written once per request even under the same revision and engine.
  const request = reanalysisId ? { reanalysisId } : {};
  const steps = startJobSteps();
  const em = deps.orm.em.fork();
  const capture = await em.findOne(Capture, { id: captureId }, { populate: ['project', 'build', 'testCase', 'target'] });
  if (!capture) {
    deps.logger.warn({ captureId }, 'capture no longer exists; nothing to analyse');
    return;
  }
  if (capture.purgedAt) {
    // A re-evaluation queued before the retention run: the audio is gone and the verdicts stay as they are.
    deps.logger.warn({ captureId, maskRevisionId }, 'capture audio was purged by the retention policy; not analysed');
    return;
  }
  // A re-evaluation names its (approved) revision; otherwise the revision in force judges.
  const mask = maskRevisionId ? await em.findOne(MaskRevision, { id: maskRevisionId }) : await maskInForce(em, capture.testCase, capture.target);
  steps.lap('loadMs');
  const attempt = job.retryCount + 1;
  const log = deps.logger.child({ captureId, attempt, mask: mask?.id ?? null });

  if (attempt >= deps.maxAttempts && job.retryCount > 0) {
    // Earlier attempts crashed or timed out: stop trying rather than loop forever.
    const judgement = errorJudgement(`Analysis abandoned after ${job.retryCount} failed attempt${job.retryCount === 1 ? "" : "s"} (worker crash, timeout or storage outage).`, ENGINE_VERSION);
    await wakeMailSender(deps, countVerdict(deps, judgement.outcome, await recordVerdict(em, captureId, mask, judgement, deps.links, request)));
    log.error('capture judged error after repeated failures');
    return;
  }

  // NOTE: the object is fetched while the capture is marked as analysing; neither waits for the other.
  // Settled here, so a failed fetch is handled below (after the mark), never as an unhandled rejection.
  const fetched: Promise<{ bytes: Buffer } | { error: unknown }> = deps.objectStore.get(capture.objectKey).then(
    (bytes) => ({ bytes }),
    (error: unknown) => ({ error }),
  );
  if (capture.status === 'queued') await markAnalysing(deps.orm, captureId, capture.build.id);
  steps.lap('markMs');
  if (deps.delayMs > 0) await new Promise((resolve) => setTimeout(resolve, deps.delayMs));

  const got = await fetched;
  if ('error' in got) {
    const { error } = got;
    if (error instanceof ObjectStoreUnavailableError) {
      log.warn({ err: error }, 'object store unavailable; the job will retry');
      throw error;
    }
    await wakeMailSender(deps, countVerdict(deps, 'error', await recordVerdict(em, captureId, mask, errorJudgement(`The stored capture cannot be read: ${(error as Error).message}`, ENGINE_VERSION), deps.links, request)));
    return;
  }
  const { bytes } = got;
  steps.lap('objectMs');
  const started = performance.now();
  const { judgement, run } = await judgeInThread(bytes, capture, mask, deps.analysis).catch((error: unknown) => {
    if (error instanceof ComputePoolBusyError || error instanceof ComputeThreadError) log.warn({ err: error }, 'analysis thread unavailable; the job will retry');
    throw error;
  });
  steps.lap('threadMs');
  const result = countVerdict(deps, judgement.outcome, await recordVerdict(em, captureId, mask, judgement, deps.links, request));
  deps.judging?.analysisTimed(judgement.outcome, (performance.now() - started) / 1000);
  // After the verdict: a plot stored for a verdict that never committed would only be unused. Advisory, like drift.
  const ms = Math.round(performance.now() - started);
  steps.lap('recordMs');
  const thread = run ? { threadStartedAt: run.startedAt, threadEndedAt: run.endedAt, threadMs: run.endedAt - run.startedAt, stimulus: run.stimulus, phases: roundPhases(run.phases) } : {};
  // The plot (a cache write that never fails the job) and the drift check are independent: both at once.
  // Drift only ever concerns the head of a branch, so a build without one needs no look (noteDrift answers 0).
  const [, driftMails] = await Promise.all([
    // The thread chose the plot's view before waivers were applied: with a waived check it may not be the page's default, so the API draws that one.
    run?.plot && !result.waivedCheckIds?.length ? steps.time('plotStoreMs', writeStoredPlot(deps.objectStore, run.plot.identity, run.plot.stored)) : undefined,
    result.written && judgement.outcome === 'pass' && capture.build.branch
      ? steps.time('driftMs', noteDrift(deps.orm.em.fork(), captureId, deps.links)).catch((error: unknown) => {
          // Drift mail is advisory: a failure here must not fail (and re-run) a recorded verdict.
          log.warn({ err: error }, 'drift check failed');
          return 0;
        })
      : 0,
  ]);
  steps.lap('afterVerdictMs');
  try {
    if (result.notificationsQueued > 0 || driftMails > 0) await deps.jobs.sendMail(result.notificationsQueued > 0 ? 'build failed' : 'drift');
    steps.lap('mailMs');
  } finally {
    // `ms`: engine + verdict, as the analysis histogram counts it; `steps`: the whole job (docs/performance.md).
    log.info({ outcome: judgement.outcome, ms, ...thread, written: result.written, steps: steps.summary() }, 'capture judged');
  }
}

const roundPhases = (phases: AnalysisPhases): AnalysisPhases => ({
  decodeMs: Math.round(phases.decodeMs * 10) / 10,
  stimulusMs: Math.round(phases.stimulusMs * 10) / 10,
  judgeMs: Math.round(phases.judgeMs * 10) / 10,
  plotMs: Math.round(phases.plotMs * 10) / 10,
});

/** Counts a verdict that was written (a re-run job that found its verdict already there adds nothing). */
function countVerdict(deps: AnalyzeDeps, outcome: VerdictOutcome, result: RecordResult): RecordResult {
  if (result.written) deps.judging?.verdictRecorded(outcome);
  return result;
}

/** An error verdict can complete a failing build: its mail goes out now rather than at the next sweep. */
async function wakeMailSender(deps: AnalyzeDeps, result: RecordResult): Promise<void> {
  if (result.notificationsQueued > 0) await deps.jobs.sendMail('build failed');
}

/** Shows the capture (and so its build) as running while the engine works. */
async function markAnalysing(orm: MikroORM, captureId: string, buildId: string): Promise<void> {
  await orm.em.fork().transactional(async (tx) => {
    const build = await tx.findOneOrFail(Build, { id: buildId }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    // Only while still queued, decided under the build's lock (which recordVerdict holds too): another
    // attempt may have judged the capture since, and its verdict must not be painted over with `analysing`.
    const marked = await tx.nativeUpdate(Capture, { id: captureId, status: 'queued' }, { status: 'analysing' });
    if (marked === 0) return;
    build.status = await computeBuildStatus(tx, build.id);
  });
}
