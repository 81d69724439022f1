import {
  CopyMaskRevisionRequest,
  MaskDiff,
  MaskDiffQuery,
  MaskHistory,
  MaskRejectRequest,
  MaskRevisionDto,
  ProjectAuditPage,
  ProjectAuditQuery,
  ProjectMaskRevisionList,
  ProjectMaskRevisionsQuery,
  RequestWaiverRequest,
  TestCaseKey,
  UpdateMaskDraftRequest,
  WaiverDecisionRequest,
  WaiverDto,
  WaiverList,
  WaiverListQuery,
  WaiverRejectRequest,
  WaiverRevokeRequest,
} from '@earmark/contracts';

import { z } from 'zod';
import { type Gate, type MaskService, parseWith, toWaiverDto } from '@earmark/domain';
import { requireProject, requireUser, type RouteContext, route, type RouteDef } from '../http/route.js';
import { wakeMailSender } from '../http/wake-mail-sender.js';

const CaseParams = z.object({ caseKey: TestCaseKey });
const RevisionParams = CaseParams.extend({ revision: z.coerce.number().int().min(1) });
const IdParams = z.object({ id: z.string() });

/** Review workflow of mask revisions, the project audit log and waivers. */
export function maskWorkflowRoutes(gate: Gate): RouteDef[] {
  const { catalog, masks, workflow, waivers } = gate;
  const caseBase = '/api/projects/:project/test-cases/:caseKey/masks/:revision';

  const revisionOf = async (ctx: RouteContext) => {
    const { caseKey, revision } = parseWith(RevisionParams, ctx.req.params, 'params');
    return { testCase: await catalog.getTestCase(ctx.em, requireProject(ctx), caseKey), revision };
  };
  /** The outbox rows are committed; the job only wakes the sender (the sweep is the safety net). */
  const sendMail = async (ctx: RouteContext, queued: number) => {
    if (queued) await wakeMailSender(gate.jobs, ctx);
  };
  const revisionAnswer = async (ctx: RouteContext, testCase: Parameters<MaskService['get']>[1], revision: number, status = 200) => {
    ctx.res.status(status).json(await masks.presentOne(ctx.em, await masks.get(ctx.em, testCase, revision)));
  };

  return [
    route({
      method: 'get',
      path: '/api/projects/:project/masks',
      access: { kind: 'project', permission: 'project.read' },
      summary: "Mask revisions of all the project's test cases (e.g. ?state=in_review for the approvals queue), newest first",
      query: ProjectMaskRevisionsQuery,
      response: ProjectMaskRevisionList,
      async handle(ctx) {
        const { state } = ctx.query;
        ctx.res.json({ items: await masks.present(ctx.em, await workflow.listForProject(ctx.em, requireProject(ctx), state)) });
      },
    }),
    route({
      method: 'get',
      path: caseBase,
      access: { kind: 'project', permission: 'project.read' },
      summary: 'One mask revision',
      response: MaskRevisionDto,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        await revisionAnswer(ctx, testCase, revision);
      },
    }),
    route({
      method: 'patch',
      path: caseBase,
      access: { kind: 'project', permission: 'mask.draft' },
      summary: 'Change a draft (checks, note, target, judging settings); only its author may, and a submitted revision answers 409',
      body: UpdateMaskDraftRequest,
      response: MaskRevisionDto,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        const body = ctx.body;
        await workflow.updateDraft(ctx.em, requireProject(ctx), testCase, revision, body, requireUser(ctx).user);
        await revisionAnswer(ctx, testCase, revision);
      },
    }),
    route({
      method: 'post',
      path: `${caseBase}/submit`,
      access: { kind: 'project', permission: 'mask.draft' },
      summary: "Submit your own draft for review; the project's QA managers are mailed. From here on it cannot change",
      response: MaskRevisionDto,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        const { mailed } = await workflow.submit(ctx.em, requireProject(ctx), testCase, revision, requireUser(ctx).user);
        await sendMail(ctx, mailed);
        await revisionAnswer(ctx, testCase, revision);
      },
    }),
    route({
      method: 'post',
      path: `${caseBase}/reject`,
      access: { kind: 'project', permission: 'mask.approve' },
      summary: 'Reject a revision in review that you neither wrote nor edited, with a comment that says why',
      body: MaskRejectRequest,
      response: MaskRevisionDto,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        const { comment } = ctx.body;
        await workflow.reject(ctx.em, requireProject(ctx), testCase, revision, requireUser(ctx).user, comment);
        await sendMail(ctx, 1); // the author hears the decision
        await revisionAnswer(ctx, testCase, revision);
      },
    }),
    route({
      method: 'post',
      path: `${caseBase}/copy`,
      access: { kind: 'project', permission: 'mask.draft' },
      summary: 'Copy any revision to a new draft (basedOn points back at it)',
      body: CopyMaskRevisionRequest,
      response: MaskRevisionDto,
      status: 201,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        const body = ctx.body;
        const draft = await workflow.copy(ctx.em, requireProject(ctx), testCase, revision, body, requireUser(ctx).user);
        ctx.res.status(201).json(await masks.presentOne(ctx.em, draft));
      },
    }),
    route({
      method: 'get',
      path: `${caseBase}/diff`,
      access: { kind: 'project', permission: 'project.read' },
      summary: 'Check-by-check differences from ?base (default: the revision it was copied from, else the previous one)',
      query: MaskDiffQuery,
      response: MaskDiff,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        const { base } = ctx.query;
        ctx.res.json(await workflow.diff(ctx.em, testCase, revision, base));
      },
    }),
    route({
      method: 'get',
      path: `${caseBase}/history`,
      access: { kind: 'project', permission: 'project.read' },
      summary: "A revision's transitions (who, when, from, to, comment), oldest first",
      response: MaskHistory,
      async handle(ctx) {
        const { testCase, revision } = await revisionOf(ctx);
        ctx.res.json(await workflow.history(ctx.em, requireProject(ctx), testCase, revision));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/audit',
      access: { kind: 'project', permission: 'audit.read' },
      summary: "The project's audit log, newest first, filtered by actor, action and entity",
      query: ProjectAuditQuery,
      response: ProjectAuditPage,
      async handle(ctx) {
        const q = ctx.query;
        ctx.res.json(await workflow.projectAudit(ctx.em, requireProject(ctx), q));
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/findings/:id/waivers',
      access: { kind: 'project', permission: 'waiver.request' },
      summary: "Ask for a waiver of a finding's check until a date; the project's QA managers are mailed",
      params: IdParams,
      body: RequestWaiverRequest,
      response: WaiverDto,
      status: 201,
      async handle(ctx) {
        const { id } = ctx.params;
        const body = ctx.body;
        const { waiver, mailed } = await waivers.request(ctx.em, requireProject(ctx), id, body, requireUser(ctx).user);
        await sendMail(ctx, mailed);
        ctx.res.status(201).json(toWaiverDto(waiver));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/waivers',
      access: { kind: 'project', permission: 'project.read' },
      summary: "The project's waivers, newest first (?state=requested|approved|rejected|expired|revoked|active)",
      query: WaiverListQuery,
      response: WaiverList,
      async handle(ctx) {
        const q = ctx.query;
        ctx.res.json({ items: (await waivers.list(ctx.em, requireProject(ctx), q)).map(toWaiverDto) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/waivers/:id/approve',
      access: { kind: 'project', permission: 'waiver.decide' },
      summary: 'Approve a waiver (not your own request); its finding becomes an accepted deviation and the captures it covers are judged again at once',
      params: IdParams,
      body: WaiverDecisionRequest,
      response: WaiverDto,
      async handle(ctx) {
        const { id } = ctx.params;
        const { comment } = ctx.body;
        const waiver = await waivers.approve(ctx.em, requireProject(ctx), id, requireUser(ctx).user, comment);
        await sendMail(ctx, 1);
        ctx.res.json(toWaiverDto(waiver));
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/waivers/:id/reject',
      access: { kind: 'project', permission: 'waiver.decide' },
      summary: 'Reject a waiver (not your own request), with a comment that says why',
      params: IdParams,
      body: WaiverRejectRequest,
      response: WaiverDto,
      async handle(ctx) {
        const { id } = ctx.params;
        const { comment } = ctx.body;
        const waiver = await waivers.reject(ctx.em, requireProject(ctx), id, requireUser(ctx).user, comment);
        await sendMail(ctx, 1);
        ctx.res.json(toWaiverDto(waiver));
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/waivers/:id/revoke',
      access: { kind: 'project', permission: 'waiver.decide' },
      summary: 'Revoke an approved waiver before its date, with a reason: the captures it covered are judged again at once and fail where they fail',
      params: IdParams,
      body: WaiverRevokeRequest,
      response: WaiverDto,
      async handle(ctx) {
        const { id } = ctx.params;
        const { reason } = ctx.body;
        const { waiver, mailed } = await waivers.revoke(ctx.em, requireProject(ctx), id, requireUser(ctx).user, reason);
        await sendMail(ctx, mailed);
        ctx.res.json(toWaiverDto(waiver));
      },
    }),
  ];
}
