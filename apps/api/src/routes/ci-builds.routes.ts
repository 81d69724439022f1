import { BuildDetail, BuildRow, CommitSha, UpsertBuildRequest } from '@earmark/contracts';
import { Build, Capture, type Project } from '@earmark/db';
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { actorName, assertAcceptsUploads, buildDetail, findOrCreateBuild, type Links, recordAudit, toBuildRow } from '@earmark/domain';
import { requireProject, route, type RouteDef } from '../http/route.js';

const BuildListQuery = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
  sha: z.string().regex(/^[0-9a-f]{1,64}$/).optional(),
});
const ShaParams = z.object({ sha: CommitSha });

const rowOf = async (em: EntityManager, build: Build, project: Project): Promise<BuildRow> => toBuildRow(build, project, await em.count(Capture, { build }));

export function ciBuildRoutes(links: Links): RouteDef[] {
  return [
    route({
      method: 'post',
      path: '/api/v1/projects/:project/builds',
      access: { kind: 'ci', permission: 'build.submit' },
      summary: 'Create a build (optionally with builtAt, when it was made), or update its label/branch/pipeline URL (upsert by commit SHA)',
      body: UpsertBuildRequest,
      response: BuildRow,
      status: 201,
      async handle(ctx) {
        const project = requireProject(ctx);
        assertAcceptsUploads(project);
        const body = ctx.body;
        // Two pipelines racing on one SHA both get the one build; only the creator answers 201.
        const { build, created } = await findOrCreateBuild(ctx.em, project, body.sha, body.builtAt === undefined ? undefined : new Date(body.builtAt));
        if (body.label !== undefined) build.label = body.label;
        if (body.branch !== undefined) build.branch = body.branch;
        if (body.pipelineUrl !== undefined) build.pipelineUrl = body.pipelineUrl;
        if (created && ctx.principal) {
          recordAudit(ctx.em, { actor: actorName(ctx.principal), action: 'build.create', subject: `build:${body.sha}`, project });
        }
        await ctx.em.flush();
        ctx.res.status(created ? 201 : 200).json(await rowOf(ctx.em, build, project));
      },
    }),
    route({
      method: 'get',
      path: '/api/v1/projects/:project/builds',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'Builds of a project, newest first, paged; `sha` filters by prefix',
      query: BuildListQuery,
      response: z.object({ items: z.array(BuildRow), total: z.number(), page: z.number(), pageSize: z.number() }),
      async handle(ctx) {
        const project = requireProject(ctx);
        const q = ctx.query;
        const where = q.sha ? { project, sha: { $like: `${q.sha}%` } } : { project };
        const [builds, total] = await ctx.em.findAndCount(Build, where, {
          orderBy: { createdAt: 'desc' },
          limit: q.pageSize,
          offset: (q.page - 1) * q.pageSize,
        });
        const items = await Promise.all(builds.map((b) => rowOf(ctx.em, b, project)));
        ctx.res.json({ items, total, page: q.page, pageSize: q.pageSize });
      },
    }),
    route({
      method: 'get',
      path: '/api/v1/projects/:project/builds/:sha',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'One build by commit SHA, with every capture and its verdict',
      params: ShaParams,
      response: BuildDetail,
      async handle(ctx) {
        const { sha } = ctx.params;
        ctx.res.json(await buildDetail(ctx.em, requireProject(ctx), sha, links));
      },
    }),
  ];
}
