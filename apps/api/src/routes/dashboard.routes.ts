import {
  AudioKind,
  BuildMatrix,
  BuildsPage,
  BuildsQuery,
  BuildTrend,
  BulkUpdateFindingsRequest,
  CaptureDetail,
  CapturePlot,
  CommentRow,
  CommitSha,
  CreateCommentRequest,
  FindingRow,
  FindingsPage,
  FindingsQuery,
  PlotQuery,
  ReanalyseResponse,
  UpdateFindingRequest,
} from '@earmark/contracts';
import { z } from 'zod';
import { buildMatrix, buildTrend, type Gate, queryBuilds } from '@earmark/domain';
import { sendWav } from '../http/send-wav.js';
import { requireProject, requireUser, route, type RouteDef } from '../http/route.js';
import { LOUDNESS_CAUTION } from './catalog.routes.js';

const ShaParams = z.object({ sha: CommitSha });
const IdParams = z.object({ id: z.uuid('a UUID') });
const AudioParams = IdParams.extend({ kind: AudioKind });

/** What the dashboard reads: builds, the build matrix, capture pages, findings triage. */
export function dashboardRoutes(gate: Gate): RouteDef[] {
  const { views, findings, reanalysis } = gate;
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/builds',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Builds table: paged, sorted and filtered on the server, with verdict counts',
      query: BuildsQuery,
      response: BuildsPage,
      async handle(ctx) {
        ctx.res.json(await queryBuilds(ctx.em, requireProject(ctx), ctx.query));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/builds/trend',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Pass rate of the newest builds, for the trend chart',
      response: BuildTrend,
      async handle(ctx) {
        ctx.res.json(await buildTrend(ctx.em, requireProject(ctx)));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/builds/:sha/matrix',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Test case × target matrix of a build, compared with the previous build on its branch',
      params: ShaParams,
      response: BuildMatrix,
      async handle(ctx) {
        const { sha } = ctx.params;
        ctx.res.json(await buildMatrix(ctx.em, requireProject(ctx), sha));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/captures/:id',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'A capture with its verdict, mask, findings and the last passing capture',
      params: IdParams,
      response: CaptureDetail,
      async handle(ctx) {
        const { id } = ctx.params;
        ctx.res.json(await views.detail(ctx.em, requireProject(ctx), id, requireUser(ctx).user));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/captures/:id/plot',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Plot data decimated for the view: spectrum (min/max per log-frequency column) with mask, phase, group delay, waveform',
      params: IdParams,
      query: PlotQuery,
      response: CapturePlot,
      async handle(ctx) {
        const { id } = ctx.params;
        ctx.res.json(await views.plot(ctx.em, requireProject(ctx), id, ctx.query));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/captures/:id/audio/:kind',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'The capture, its stimulus or the residual as 32-bit float WAV for listening (loud: see the caution header)',
      params: AudioParams,
      doc: { responseContentType: 'audio/wav' },
      async handle(ctx) {
        const { id, kind } = ctx.params;
        const wav = await views.audio(ctx.em, requireProject(ctx), id, kind);
        await sendWav(ctx.res, wav, { 'X-Earmark-Caution': LOUDNESS_CAUTION, 'Cache-Control': 'private, max-age=300' });
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/captures/:id/download',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'The capture exactly as uploaded (byte for byte from storage) as a file download; 410 once the retention policy removed it',
      params: IdParams,
      doc: { responseContentType: 'audio/wav' },
      async handle(ctx) {
        const { id } = ctx.params;
        const file = await views.original(ctx.em, requireProject(ctx), id);
        ctx.res
          .status(200)
          .type(file.contentType)
          .setHeader('Content-Disposition', `attachment; filename="${file.filename}"`)
          .setHeader('Content-Length', String(file.body.byteLength))
          .setHeader('X-Earmark-Caution', LOUDNESS_CAUTION)
          .setHeader('Cache-Control', 'private, max-age=300')
          .end(file.body);
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/captures/:id/reanalyse',
      access: { kind: 'project', permission: 'build.submit' },
      summary: 'Analyse a stored capture again under the mask in force (audited); the capture is queued and gets a new verdict',
      params: IdParams,
      response: ReanalyseResponse,
      status: 202,
      async handle(ctx) {
        const { id } = ctx.params;
        ctx.res.status(202).json(await reanalysis.reanalyse(ctx.em, requireProject(ctx), id, requireUser(ctx).user));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/findings',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Findings queue, filtered by state, assignee, test case, target or capture',
      query: FindingsQuery,
      response: FindingsPage,
      async handle(ctx) {
        ctx.res.json(await findings.list(ctx.em, requireProject(ctx), ctx.query, requireUser(ctx).user));
      },
    }),
    route({
      method: 'patch',
      path: '/api/projects/:project/findings/:id',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Assign a finding or change its state',
      params: IdParams,
      body: UpdateFindingRequest,
      response: FindingRow,
      async handle(ctx) {
        const { id } = ctx.params;
        const body = ctx.body;
        const [row] = await findings.update(ctx.em, requireProject(ctx), [id], body, requireUser(ctx).user);
        ctx.res.json(row);
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/findings/bulk',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Assign or change the state of several findings at once',
      body: BulkUpdateFindingsRequest,
      response: z.object({ items: z.array(FindingRow) }),
      async handle(ctx) {
        const { ids, ...change } = ctx.body;
        ctx.res.json({ items: await findings.update(ctx.em, requireProject(ctx), ids, change, requireUser(ctx).user) });
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/findings/:id/comments',
      access: { kind: 'project', permission: 'build.read' },
      summary: "A finding's comments, oldest first",
      params: IdParams,
      response: z.object({ items: z.array(CommentRow) }),
      async handle(ctx) {
        const { id } = ctx.params;
        ctx.res.json({ items: await findings.comments(ctx.em, requireProject(ctx), id) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/findings/:id/comments',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Comment on a finding',
      params: IdParams,
      body: CreateCommentRequest,
      response: CommentRow,
      status: 201,
      async handle(ctx) {
        const { id } = ctx.params;
        const { body } = ctx.body;
        ctx.res.status(201).json(await findings.addComment(ctx.em, requireProject(ctx), id, body, requireUser(ctx).user));
      },
    }),
  ];
}
