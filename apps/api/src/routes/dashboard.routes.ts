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
  UpdateFindingRequest,
} from '@earmark/contracts';
import { z } from 'zod';
import { buildMatrix, buildTrend, type Gate, parseWith, queryBuilds } from '@earmark/domain';
import { requireProject, requireUser, type RouteDef } from '../http/route.js';
import { LOUDNESS_CAUTION } from './catalog.routes.js';

const ShaParams = z.object({ sha: CommitSha });
const IdParams = z.object({ id: z.uuid('a UUID') });
const AudioParams = IdParams.extend({ kind: AudioKind });

/** What the dashboard reads: builds, the build matrix, capture pages, findings triage. */
export function dashboardRoutes(gate: Gate): RouteDef[] {
  const { views, findings } = gate;
  return [
    {
      method: 'get',
      path: '/api/projects/:project/builds',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Builds table: paged, sorted and filtered on the server, with verdict counts',
      doc: { query: BuildsQuery, response: BuildsPage },
      async handle(ctx) {
        ctx.res.json(await queryBuilds(ctx.em, requireProject(ctx), parseWith(BuildsQuery, ctx.req.query, 'query')));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/builds/trend',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Pass rate of the newest builds, for the trend chart',
      doc: { response: BuildTrend },
      async handle(ctx) {
        ctx.res.json(await buildTrend(ctx.em, requireProject(ctx)));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/builds/:sha/matrix',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Test case × target matrix of a build, compared with the previous build on its branch',
      doc: { response: BuildMatrix },
      async handle(ctx) {
        const { sha } = parseWith(ShaParams, ctx.req.params, 'params');
        ctx.res.json(await buildMatrix(ctx.em, requireProject(ctx), sha));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/captures/:id',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'A capture with its verdict, mask, findings and the last passing capture',
      doc: { response: CaptureDetail },
      async handle(ctx) {
        const { id } = parseWith(IdParams, ctx.req.params, 'params');
        ctx.res.json(await views.detail(ctx.em, requireProject(ctx), id, requireUser(ctx).user));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/captures/:id/plot',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Plot data decimated for the view: spectrum (min/max per log-frequency column) with mask, phase, group delay, waveform',
      doc: { query: PlotQuery, response: CapturePlot },
      async handle(ctx) {
        const { id } = parseWith(IdParams, ctx.req.params, 'params');
        ctx.res.json(await views.plot(ctx.em, requireProject(ctx), id, parseWith(PlotQuery, ctx.req.query, 'query')));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/captures/:id/audio/:kind',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'The capture, its stimulus or the residual as 32-bit float WAV for listening (loud: see the caution header)',
      doc: { responseContentType: 'audio/wav' },
      async handle(ctx) {
        const { id, kind } = parseWith(AudioParams, ctx.req.params, 'params');
        const wav = await views.audio(ctx.em, requireProject(ctx), id, kind);
        ctx.res.type('audio/wav').setHeader('X-Earmark-Caution', LOUDNESS_CAUTION).setHeader('Cache-Control', 'private, max-age=300').send(Buffer.from(wav.buffer, wav.byteOffset, wav.byteLength));
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/findings',
      access: { kind: 'project', permission: 'build.read' },
      summary: 'Findings queue, filtered by state, assignee, test case, target or capture',
      doc: { query: FindingsQuery, response: FindingsPage },
      async handle(ctx) {
        ctx.res.json(await findings.list(ctx.em, requireProject(ctx), parseWith(FindingsQuery, ctx.req.query, 'query'), requireUser(ctx).user));
      },
    },
    {
      method: 'patch',
      path: '/api/projects/:project/findings/:id',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Assign a finding or change its state',
      doc: { body: UpdateFindingRequest, response: FindingRow },
      async handle(ctx) {
        const { id } = parseWith(IdParams, ctx.req.params, 'params');
        const body = parseWith(UpdateFindingRequest, ctx.req.body, 'body');
        const [row] = await findings.update(ctx.em, requireProject(ctx), [id], body, requireUser(ctx).user);
        ctx.res.json(row);
      },
    },
    {
      method: 'post',
      path: '/api/projects/:project/findings/bulk',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Assign or change the state of several findings at once',
      doc: { body: BulkUpdateFindingsRequest, response: z.object({ items: z.array(FindingRow) }) },
      async handle(ctx) {
        const { ids, ...change } = parseWith(BulkUpdateFindingsRequest, ctx.req.body, 'body');
        ctx.res.json({ items: await findings.update(ctx.em, requireProject(ctx), ids, change, requireUser(ctx).user) });
      },
    },
    {
      method: 'get',
      path: '/api/projects/:project/findings/:id/comments',
      access: { kind: 'project', permission: 'build.read' },
      summary: "A finding's comments, oldest first",
      doc: { response: z.object({ items: z.array(CommentRow) }) },
      async handle(ctx) {
        const { id } = parseWith(IdParams, ctx.req.params, 'params');
        ctx.res.json({ items: await findings.comments(ctx.em, requireProject(ctx), id) });
      },
    },
    {
      method: 'post',
      path: '/api/projects/:project/findings/:id/comments',
      access: { kind: 'project', permission: 'finding.triage' },
      summary: 'Comment on a finding',
      doc: { body: CreateCommentRequest, response: CommentRow, status: 201 },
      async handle(ctx) {
        const { id } = parseWith(IdParams, ctx.req.params, 'params');
        const { body } = parseWith(CreateCommentRequest, ctx.req.body, 'body');
        ctx.res.status(201).json(await findings.addComment(ctx.em, requireProject(ctx), id, body, requireUser(ctx).user));
      },
    },
  ];
}
