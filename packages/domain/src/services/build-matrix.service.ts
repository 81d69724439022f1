import type { EntityManager } from '@mikro-orm/postgresql';
import type { BuildMatrix, CellOutcome, MatrixCell } from '@earmark/contracts';
import { Build, Capture, Target, TestCase, type Project } from '@earmark/db';
import { NotFoundError } from '../errors.js';
import { buildSummary } from './builds-query.service.js';
import { latestVerdicts } from './capture-presenter.js';
import { DriftService } from './drift.service.js';

async function cellsOf(em: EntityManager, build: Build) {
  const captures = await em.find(Capture, { build }, { populate: ['testCase', 'target'], orderBy: { createdAt: 'asc' } });
  const verdicts = await latestVerdicts(em, captures);
  // The newest capture of each test case × target is the cell (earlier ones were re-runs).
  const newest = new Map<string, Capture>();
  for (const c of captures) newest.set(`${c.testCase.key}\u0000${c.target.key}`, c);
  return { newest, verdicts };
}

const outcomeOf = (verdict: { outcome: CellOutcome } | undefined): CellOutcome => verdict?.outcome ?? 'pending';

/** The test case × target matrix of a build, compared with the previous build on its branch. */
export async function buildMatrix(em: EntityManager, project: Project, sha: string): Promise<BuildMatrix> {
  const build = await em.findOne(Build, { project, sha });
  if (!build) throw new NotFoundError(`There is no build ${sha} in ${project.key}.`);
  const previous = await em.findOne(
    Build,
    { project, createdAt: { $lt: build.createdAt }, ...(build.branch ? { branch: build.branch } : {}) },
    { orderBy: { createdAt: 'desc' } },
  );
  const current = await cellsOf(em, build);
  const before = previous ? await cellsOf(em, previous) : null;

  const cells: MatrixCell[] = [...current.newest.entries()].map(([key, capture]) => {
    const verdict = current.verdicts.get(capture.id);
    const prior = before?.newest.get(key);
    return {
      testCase: capture.testCase.key,
      target: capture.target.key,
      captureId: capture.id,
      outcome: outcomeOf(verdict),
      failing: (verdict?.checks ?? []).filter((c) => !c.pass).sort((a, b) => (a.margin ?? 0) - (b.margin ?? 0)),
      // An error cell says why in words: the verdict's reason, else the first check that could not be evaluated.
      reason: verdict?.outcome === 'error' ? (verdict.reason ?? verdict.checks.find((c) => c.error)?.error ?? null) : null,
      previous: prior ? outcomeOf(before!.verdicts.get(prior.id)) : null,
      waiver: verdict?.waiver ?? null,
    };
  });
  const testCases = await em.find(TestCase, { project }, { orderBy: { key: 'asc' } });
  const targets = await em.find(Target, { project }, { orderBy: { key: 'asc' } });
  const usedCases = new Set(cells.map((c) => c.testCase));
  const usedTargets = new Set(cells.map((c) => c.target));
  return {
    build: await buildSummary(em, project, build.id),
    testCases: testCases.filter((t) => usedCases.has(t.key)).map((t) => ({ key: t.key, name: t.name })),
    targets: targets.filter((t) => usedTargets.has(t.key)).map((t) => ({ key: t.key, name: t.name })),
    cells,
    compared: previous ? await buildSummary(em, project, previous.id) : null,
    drift: await new DriftService().flagsAt(em, project, build),
  };
}
