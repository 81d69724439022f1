import { CaptureDto, CommitSha, RAW_FLOAT32_MEDIA_TYPE } from '@earmark/contracts';
import { Capture } from '@earmark/db';
import { IsolationLevel } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { buildDetail, type CaptureIngestService, type Links, parseWith, presentCaptures, renderJunit } from '@earmark/domain';
import { readCaptureUpload } from '../http/capture-upload.js';
import { requireProject, route, type RouteDef } from '../http/route.js';

const ShaParams = z.object({ sha: CommitSha });
const CaptureParams = z.object({ id: z.uuid('a capture id (UUID)') });

export function ciCaptureRoutes(ingest: CaptureIngestService, links: Links, maxCaptureBytes: number): RouteDef[] {
  return [
    route({
      method: 'post',
      path: '/api/v1/projects/:project/builds/:sha/captures',
      access: { kind: 'ci', permission: 'build.submit' },
      summary: 'Upload a capture (WAV, raw float32 or multipart); answers 202 and queues the analysis',
      params: ShaParams,
      response: CaptureDto,
      status: 202,
      // The upload names its test case and target in the query (raw bodies) or in form fields
      // (multipart), so readCaptureUpload parses them, not the mount.
      doc: { bodyContentTypes: ['audio/wav', RAW_FLOAT32_MEDIA_TYPE, 'multipart/form-data'], query: z.object({ testCase: z.string(), target: z.string().optional() }) },
      async handle(ctx) {
        const { sha } = ctx.params;
        const project = requireProject(ctx);
        const upload = await readCaptureUpload(ctx.req, maxCaptureBytes, (destination) => ingest.resolveCaseAndTarget(ctx.em, project, destination));
        const result = await ingest.ingest(ctx.em, project, sha, upload, ctx.principal!);
        ctx.res.status(result.created ? 202 : 200).setHeader('Location', result.capture.links.self).json(result.capture);
      },
    }),
    route({
      method: 'get',
      path: '/api/v1/captures/:id',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'A capture with its status and verdict (poll until the verdict is there)',
      params: CaptureParams,
      response: CaptureDto,
      async resolveProjectKey(req, em) {
        const { id } = parseWith(CaptureParams, req.params, 'params');
        // Only the project's key, not the entity: a capture loaded here would sit in the request's
        // identity map with the status it had before authorisation, and the handler would answer
        // that stale status beside a verdict recorded in between.
        const rows = await em.getConnection().execute<{ key: string }[]>(
          'select p.key from capture c join project p on p.id = c.project_id where c.id = ?',
          [id],
        );
        // Missing and foreign captures answer alike (authorize throws this detail for both).
        return { projectKey: rows[0]?.key ?? null, notFoundDetail: `There is no capture ${id}, or you have no access to it.` };
      },
      async handle(ctx) {
        const { id } = ctx.params;
        // One snapshot for the capture and its verdict: a verdict committed between the two reads
        // would otherwise be shown beside the status from before it.
        const dto = await ctx.em.transactional(async (tx) => {
          const capture = await tx.findOneOrFail(Capture, { id }, { populate: ['project', 'build', 'testCase', 'target'] });
          return (await presentCaptures(tx, [capture], links))[0];
        }, { isolationLevel: IsolationLevel.REPEATABLE_READ, readOnly: true });
        ctx.res.json(dto);
      },
    }),
    route({
      method: 'get',
      path: '/api/v1/projects/:project/builds/:sha/junit.xml',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'JUnit XML of a build: one testsuite per target, one testcase per test case × check',
      params: ShaParams,
      doc: { responseContentType: 'application/xml' },
      async handle(ctx) {
        const { sha } = ctx.params;
        const detail = await buildDetail(ctx.em, requireProject(ctx), sha, links);
        ctx.res.type('application/xml').send(renderJunit(detail));
      },
    }),
  ];
}
