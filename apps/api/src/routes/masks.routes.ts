import { CreateMaskRevisionRequest, MaskDecisionRequest, MaskRevisionDto, TestCaseKey } from '@earmark/contracts';
import { z } from 'zod';
import { type CatalogService, type JobProducer, type MaskService, parseWith } from '@earmark/domain';
import { requireProject, requireUser, type RouteContext, route, type RouteDef } from '../http/route.js';
import { wakeMailSender } from '../http/wake-mail-sender.js';

const CaseParams = z.object({ caseKey: TestCaseKey });
const RevisionParams = CaseParams.extend({ revision: z.coerce.number().int().min(1) });

export function maskRoutes(masks: MaskService, catalog: CatalogService, jobs: JobProducer): RouteDef[] {
  const testCaseOf = async (ctx: RouteContext) => {
    const { caseKey } = parseWith(CaseParams, ctx.req.params, 'params');
    return catalog.getTestCase(ctx.em, requireProject(ctx), caseKey);
  };
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/test-cases/:caseKey/masks',
      access: { kind: 'project', permission: 'project.read' },
      summary: "A test case's mask revisions, newest first",
      response: z.object({ items: z.array(MaskRevisionDto) }),
      async handle(ctx) {
        ctx.res.json({ items: await masks.present(ctx.em, await masks.list(ctx.em, await testCaseOf(ctx))) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/test-cases/:caseKey/masks',
      access: { kind: 'project', permission: 'mask.draft' },
      summary: 'Draft a new mask revision (checks validated as a mask document)',
      body: CreateMaskRevisionRequest,
      response: MaskRevisionDto,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        const draft = await masks.createDraft(ctx.em, requireProject(ctx), await testCaseOf(ctx), body, requireUser(ctx).user);
        ctx.res.status(201).json(await masks.presentOne(ctx.em, await masks.get(ctx.em, draft.testCase, draft.revision)));
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/test-cases/:caseKey/masks/:revision/approve',
      access: { kind: 'project', permission: 'mask.approve' },
      summary: 'Approve a revision in review that you neither wrote nor edited, with an optional comment; it replaces the revision in force',
      params: RevisionParams,
      body: MaskDecisionRequest,
      response: MaskRevisionDto,
      async handle(ctx) {
        const { revision } = ctx.params;
        const { comment } = ctx.body;
        const testCase = await testCaseOf(ctx);
        await masks.approve(ctx.em, requireProject(ctx), testCase, revision, requireUser(ctx).user, comment);
        await wakeMailSender(jobs, ctx); // the author hears the decision
        ctx.res.json(await masks.presentOne(ctx.em, await masks.get(ctx.em, testCase, revision)));
      },
    }),
  ];
}
