import { CaptureDto, CommitSha, RAW_FLOAT32_MEDIA_TYPE } from '@earmark/contracts';
import { Capture } from '@earmark/db';
import { IsolationLevel } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { assertAcceptsUploads, buildDetail, type CaptureIngestService, type Links, parseWith, presentCaptures, renderJunit, type ResolvedDestination } from '@earmark/domain';
import { readCaptureUpload } from '../http/capture-upload.js';
import type { UploadSlots } from '../http/upload-slots.js';
import { requireProject, route, type RouteDef } from '../http/route.js';
import { etagOf, matchesIfNoneMatch } from '../http/etag.js';
import type { VerdictWaits } from '../waits/verdict-waits.js';
import type { UploadMetrics } from '../metrics/api-metrics.js';

const ShaParams = z.object({ sha: CommitSha });
const CaptureParams = z.object({ id: z.uuid('a capture id (UUID)') });
/** Longest hold: below common proxy and load-balancer idle timeouts (60 s). */
export const MAX_VERDICT_WAIT_S = 30;
const CaptureQuery = z.object({
  wait: z.coerce
    .number('seconds to wait for the verdict, 0 to 30')
    .int('whole seconds, 0 to 30')
    .min(0, 'at least 0 seconds')
    .max(MAX_VERDICT_WAIT_S, `at most ${MAX_VERDICT_WAIT_S} seconds`)
    .default(0),
});

export function ciCaptureRoutes(ingest: CaptureIngestService, links: Links, maxCaptureBytes: number, verdictWaits: VerdictWaits, uploadSlots: UploadSlots, uploads: UploadMetrics): RouteDef[] {
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
        // Refused before the upload is read; the body is drained so the client sees the answer.
        if (project.archivedAt) {
          ctx.req.resume();
          assertAcceptsUploads(project);
        }
        let release: () => void;
        try {
          release = uploadSlots.take();
        } catch (error) {
          uploads.refused();
          ctx.req.resume();
          throw error;
        }
        try {
          let resolved: ResolvedDestination | undefined;
          const upload = await readCaptureUpload(ctx.req, maxCaptureBytes, async (destination) => (resolved = await ingest.resolveCaseAndTarget(ctx.em, project, destination)));
          const result = await ingest.ingest(ctx.em, project, sha, upload, ctx.principal!, resolved);
          if (result.created) uploads.accepted(upload.bytes.byteLength);
          else uploads.replayed();
          ctx.res.status(result.created ? 202 : 200).setHeader('Location', result.capture.links.self).json(result.capture);
        } catch (error) {
          uploads.refused();
          throw error;
        } finally {
          release();
        }
      },
    }),
    route({
      method: 'get',
      path: '/api/v1/captures/:id',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'A capture with its status and verdict; ?wait=N (0–30 s) holds the answer until the verdict is there or N s pass. ETag / If-None-Match → 304',
      params: CaptureParams,
      query: CaptureQuery,
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
        const read = () =>
          ctx.em.fork().transactional(async (tx) => {
            const capture = await tx.findOneOrFail(Capture, { id }, { populate: ['project', 'build', 'testCase', 'target'] });
            return (await presentCaptures(tx, [capture], links))[0]!;
          }, { isolationLevel: IsolationLevel.REPEATABLE_READ, readOnly: true });
        // One indexed look-up decides whether to hold, so a held request reads the whole capture once.
        const hasVerdict = async () =>
          (await ctx.em.getConnection().execute<{ judged: boolean }[]>('select exists (select 1 from verdict where capture_id = ?) as judged', [id]))[0]?.judged === true;
        // The slot is taken before the look-up, so a verdict committed in between still wakes us.
        const held = ctx.query.wait > 0 ? verdictWaits.open(id) : null;
        try {
          if (held && !(await hasVerdict())) {
            const gone = new AbortController();
            const onClose = () => gone.abort();
            ctx.res.once('close', onClose);
            const reason = await held.until(ctx.query.wait * 1000, gone.signal);
            ctx.res.off('close', onClose);
            if (reason === 'aborted') return; // the client went away: nobody to answer
            held.release();
          }
          const dto = await read();
          const etag = etagOf(dto);
          ctx.res.setHeader('ETag', etag).setHeader('Cache-Control', 'private, no-cache');
          if (matchesIfNoneMatch(ctx.req.headers['if-none-match'], etag)) {
            ctx.res.status(304).end();
            return;
          }
          ctx.res.json(dto);
        } finally {
          held?.release();
        }
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
