import type { EntityManager } from '@mikro-orm/postgresql';
import type { BuildDetail, BuildRow } from '@earmark/contracts';
import { Build, Capture, type Project } from '@earmark/db';
import { NotFoundError } from '../errors.js';
import { presentCaptures } from './capture-presenter.js';
import type { Links } from './links.js';

/** The BuildRow fields of a build (the CI answer to an upsert, and the base of the detail). */
export function toBuildRow(build: Build, project: Project, captureCount: number): BuildRow {
  return {
    id: build.id,
    projectKey: project.key,
    sha: build.sha,
    label: build.label,
    branch: build.branch,
    pipelineUrl: build.pipelineUrl,
    status: build.status,
    createdAt: build.createdAt.toISOString(),
    captureCount,
  };
}

/** A build with every capture and its newest verdict. */
export async function buildDetail(em: EntityManager, project: Project, sha: string, links: Links): Promise<BuildDetail> {
  const build = await em.findOne(Build, { project, sha });
  if (!build) throw new NotFoundError(`There is no build ${sha} in ${project.key}.`);
  const captures = await em.find(Capture, { build }, { populate: ['project', 'build', 'testCase', 'target'], orderBy: { createdAt: 'asc' } });
  const dtos = await presentCaptures(em, captures, links);
  const counts = { pass: 0, fail: 0, error: 0, pending: 0, waived: 0 };
  for (const c of dtos) {
    counts[c.verdict?.outcome ?? 'pending'] += 1;
    if (c.verdict?.waiver) counts.waived += 1;
  }
  return {
    ...toBuildRow(build, project, dtos.length),
    counts,
    captures: dtos,
    links: { self: links.buildApi(project.key, sha), junit: links.junit(project.key, sha), dashboard: links.buildPage(project.key, sha) },
  };
}
