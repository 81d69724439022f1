import { EvaluateImpactJob, aggregateVerdicts, type ImpactBuildRow, type ImpactCaptureRow, type ImpactCheckRow, type ImpactResult, type VerdictFlip, type VerdictOutcome } from '@earmark/contracts';
import { Capture, CheckResult, ImpactRun, type MaskRevision } from '@earmark/db';
import { ComputePoolBusyError, ComputeThreadError, ObjectStoreUnavailableError, type ObjectStore } from '@earmark/platform';
import type { EntityManager, MikroORM } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { capturesGovernedBy, errorJudgement, type Judgement, newestVerdict, recentBuilds } from '@earmark/domain';
import { judgeInThread, type AnalysisSlots } from './judge-in-thread.js';

export interface ImpactDeps {
  orm: MikroORM;
  objectStore: ObjectStore;
  logger: Logger;
  /** The analysis threads the capture jobs use: an impact run waits for a free slot like any capture. */
  analysis: AnalysisSlots;
}

/** Progress is written every this many captures (and at the end). */
const PROGRESS_EVERY = 3;

interface CheckOutcome {
  pass: boolean;
  margin: number | null;
  unit: string | null;
}

interface Evaluated {
  capture: Capture;
  current: { outcome: VerdictOutcome; revision: number | null; checks: Map<string, CheckOutcome> } | null;
  draft: Judgement;
}

const flipOf = (current: VerdictOutcome | boolean | null | undefined, draft: VerdictOutcome | boolean | null | undefined): VerdictFlip | null => {
  const pass = (v: typeof current) => v === true || v === 'pass';
  const fail = (v: typeof current) => v === false || v === 'fail';
  if (pass(current) && fail(draft)) return 'pass-to-fail';
  if (fail(current) && pass(draft)) return 'fail-to-pass';
  return null;
};

/** Worst (smallest) margin of a check over captures; pass only if every capture passed it. */
function combine(list: CheckOutcome[]): CheckOutcome | null {
  if (list.length === 0) return null;
  const margins = list.map((c) => c.margin).filter((m): m is number => m !== null);
  return { pass: list.every((c) => c.pass), margin: margins.length ? Math.min(...margins) : null, unit: list[0]?.unit ?? null };
}

/** Per build and per check: the newest stored verdicts against the revision's. */
export function summarizeImpact(builds: { id: string; sha: string; branch: string | null; label: string | null; createdAt: Date }[], evaluated: Evaluated[]): ImpactResult {
  const rows: ImpactBuildRow[] = [];
  const worst = new Map<string, { unit: string | null; current: number | null; draft: number | null }>();
  const noteWorst = (id: string, unit: string | null, side: 'current' | 'draft', margin: number | null) => {
    const w = worst.get(id) ?? { unit, current: null, draft: null };
    if (margin !== null) w[side] = w[side] === null ? margin : Math.min(w[side] as number, margin);
    w.unit ??= unit;
    worst.set(id, w);
  };
  let capturesPassToFail = 0;
  let capturesFailToPass = 0;
  for (const b of builds) {
    const mine = evaluated.filter((e) => e.capture.build.id === b.id);
    if (mine.length === 0) continue;
    const captures: ImpactCaptureRow[] = mine.map((e) => {
      const flip = flipOf(e.current?.outcome, e.draft.outcome);
      if (flip === 'pass-to-fail') capturesPassToFail++;
      if (flip === 'fail-to-pass') capturesFailToPass++;
      return { captureId: e.capture.id, target: e.capture.target.key, current: e.current?.outcome ?? null, currentRevision: e.current?.revision ?? null, draft: e.draft.outcome, flip, reason: e.draft.reason };
    });
    const ids = [...new Set(mine.flatMap((e) => [...(e.current?.checks.keys() ?? []), ...e.draft.checks.map((c) => c.id)]))].sort();
    const checks: ImpactCheckRow[] = ids.map((id) => {
      const current = combine(mine.flatMap((e) => (e.current?.checks.has(id) ? [e.current.checks.get(id) as CheckOutcome] : [])));
      const draft = combine(mine.flatMap((e) => e.draft.checks.filter((c) => c.id === id).map((c) => ({ pass: c.pass, margin: c.margin, unit: c.unit }))));
      if (current) noteWorst(id, current.unit, 'current', current.margin);
      if (draft) noteWorst(id, draft.unit, 'draft', draft.margin);
      return {
        checkId: id,
        unit: draft?.unit ?? current?.unit ?? null,
        current: current ? { pass: current.pass, margin: current.margin } : null,
        draft: draft ? { pass: draft.pass, margin: draft.margin } : null,
        flip: flipOf(current?.pass, draft?.pass),
      };
    });
    const currentOutcomes = mine.flatMap((e) => (e.current ? [e.current.outcome] : []));
    const current = currentOutcomes.length ? aggregateVerdicts(currentOutcomes) : null;
    const draft = aggregateVerdicts(mine.map((e) => e.draft.outcome));
    rows.push({ sha: b.sha, branch: b.branch, label: b.label, createdAt: b.createdAt.toISOString(), current, draft, flip: flipOf(current, draft), checks, captures });
  }
  return {
    builds: rows,
    summary: {
      builds: rows.length,
      captures: evaluated.length,
      passToFail: rows.filter((r) => r.flip === 'pass-to-fail').length,
      failToPass: rows.filter((r) => r.flip === 'fail-to-pass').length,
      capturesPassToFail,
      capturesFailToPass,
      worst: [...worst.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([checkId, w]) => ({ checkId, ...w })),
    },
  };
}

/** The newest stored verdict of a capture with its check results (what the build page shows today). */
async function currentVerdict(em: EntityManager, capture: Capture): Promise<Evaluated['current']> {
  const verdict = await newestVerdict(em, capture, ['maskRevision']);
  if (!verdict) return null;
  const results = await em.find(CheckResult, { verdict });
  return {
    outcome: verdict.outcome,
    revision: verdict.maskRevision?.revision ?? null,
    checks: new Map(results.map((r) => [r.checkId, { pass: r.pass, margin: r.margin, unit: typeof r.details.unit === 'string' ? r.details.unit : null }])),
  };
}

/** Writes progress (or the end state) in its own short transaction, so the API sees it at once. */
async function update(orm: MikroORM, runId: string, patch: Partial<Pick<ImpactRun, 'state' | 'progress' | 'total' | 'result' | 'error' | 'finishedAt'>>): Promise<void> {
  await orm.em.fork().nativeUpdate(ImpactRun, { id: runId }, patch);
}

/**
 * "What would this revision have said?": evaluates the revision (any state) on the governed
 * captures of the project's last N builds that hold its test case, compares with the newest
 * stored verdicts, and stores the result on the run. Nothing else is written, so a re-run
 * (pg-boss retry after a storage outage) simply starts over.
 */
export async function evaluateImpact(job: PgBoss.Job<unknown>, deps: ImpactDeps): Promise<void> {
  const { impactRunId } = EvaluateImpactJob.parse(job.data);
  const em = deps.orm.em.fork();
  const run = await em.findOne(ImpactRun, { id: impactRunId }, { populate: ['maskRevision', 'maskRevision.testCase', 'maskRevision.testCase.project', 'maskRevision.target'] });
  if (!run || run.state === 'done' || run.state === 'error') return;
  const log = deps.logger.child({ impactRunId, revision: run.maskRevision.id });
  const mask: MaskRevision = run.maskRevision;
  const testCase = mask.testCase;
  try {
    const builds = await recentBuilds(em, testCase.project, testCase, 'last-n', run.builds);
    // Captures whose audio the retention policy removed cannot be judged again: left out, not counted as errors.
    const cells = (await capturesGovernedBy(em, mask, builds.map((b) => b.id))).filter((c) => !c.purged);
    await update(deps.orm, run.id, { state: 'running', progress: 0, total: cells.length });
    const captures = await em.find(Capture, { id: { $in: cells.map((c) => c.id) } }, { populate: ['build', 'testCase', 'target'] });
    const evaluated: Evaluated[] = [];
    for (const capture of captures) {
      let draft: Judgement;
      try {
        const bytes = await deps.objectStore.get(capture.objectKey);
        draft = (await judgeInThread(bytes, capture, mask, deps.analysis)).judgement;
      } catch (error) {
        if (error instanceof ObjectStoreUnavailableError || error instanceof ComputePoolBusyError || error instanceof ComputeThreadError) throw error;
        draft = errorJudgement(`The stored capture cannot be read: ${(error as Error).message}`, '');
      }
      evaluated.push({ capture, current: await currentVerdict(em, capture), draft });
      if (evaluated.length % PROGRESS_EVERY === 0) await update(deps.orm, run.id, { progress: evaluated.length });
    }
    const result = summarizeImpact(builds.map((b) => ({ id: b.id, sha: b.sha, branch: b.branch, label: b.label, createdAt: new Date(b.created_at) })), evaluated);
    await update(deps.orm, run.id, { state: 'done', progress: evaluated.length, result: result as unknown as Record<string, unknown>, finishedAt: new Date() });
    log.info({ captures: evaluated.length, passToFail: result.summary.passToFail, failToPass: result.summary.failToPass }, 'impact run done');
  } catch (error) {
    if (error instanceof ObjectStoreUnavailableError || error instanceof ComputePoolBusyError || error instanceof ComputeThreadError) {
      log.warn({ err: error }, 'object store or analysis threads unavailable; the impact run will retry');
      throw error;
    }
    log.error({ err: error }, 'impact run failed');
    await update(deps.orm, run.id, { state: 'error', error: `The impact run failed: ${(error as Error).message}`, finishedAt: new Date() });
  }
}
