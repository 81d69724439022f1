import {
  CreateImpactRunRequest,
  DeriveMaskRequest,
  DeriveMaskResponse,
  DriftQuery,
  DriftResponse,
  ImpactRunDto,
  ReevaluateRequest,
  ReevaluateResponse,
  TestCaseKey,
} from '@earmark/contracts';
import { z } from 'zod';
import { requireProject, requireUser, type RouteContext, route, type RouteDef } from '../http/route.js';
import { type Gate, parseWith, toImpactRunDto } from '@earmark/domain';

const CaseParams = z.object({ caseKey: TestCaseKey });
const RevisionParams = CaseParams.extend({ revision: z.coerce.number().int().min(1) });
const RunParams = RevisionParams.extend({ runId: z.uuid() });
const base = '/api/projects/:project/test-cases/:caseKey/masks';

/** Deriving limits from golden captures, impact of a revision on past builds, re-evaluation, drift. */
export function maskDerivationRoutes(gate: Gate): RouteDef[] {
  const { catalog, derivation, impact, drift } = gate;
  const testCaseOf = async (ctx: RouteContext) => {
    const { caseKey } = parseWith(CaseParams, ctx.req.params, 'params');
    return catalog.getTestCase(ctx.em, requireProject(ctx), caseKey);
  };
  return [
    route({
      method: 'post',
      path: `${base}/derive`,
      access: { kind: 'project', permission: 'mask.draft' },
      summary: 'Propose a magnitude envelope from 2–50 golden captures: mean ± (k·σ + guard), simplified to maxSegments segments per limit, with its estimated false-reject rate over guard bands',
      body: DeriveMaskRequest,
      response: DeriveMaskResponse,
      doc: { tags: ['masks'] },
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.json(await derivation.derive(ctx.em, requireProject(ctx), await testCaseOf(ctx), body));
      },
    }),
    route({
      method: 'post',
      path: `${base}/:revision/impact`,
      access: { kind: 'project', permission: 'mask.draft' },
      summary: "Start evaluating a revision on the captures of the project's last N builds (a job with progress)",
      params: RevisionParams,
      body: CreateImpactRunRequest,
      response: ImpactRunDto,
      status: 202,
      doc: { tags: ['masks'] },
      async handle(ctx) {
        const { revision } = ctx.params;
        const body = ctx.body;
        const testCase = await testCaseOf(ctx);
        const run = await impact.start(ctx.em, requireProject(ctx), testCase, revision, body, requireUser(ctx).user);
        ctx.res.status(202).json(toImpactRunDto(await impact.get(ctx.em, testCase, revision, run.id)));
      },
    }),
    route({
      method: 'get',
      path: `${base}/:revision/impact`,
      access: { kind: 'project', permission: 'project.read' },
      summary: "A revision's impact runs, newest first",
      params: RevisionParams,
      response: z.object({ items: z.array(ImpactRunDto) }),
      doc: { tags: ['masks'] },
      async handle(ctx) {
        const { revision } = ctx.params;
        ctx.res.json({ items: (await impact.list(ctx.em, await testCaseOf(ctx), revision)).map(toImpactRunDto) });
      },
    }),
    route({
      method: 'get',
      path: `${base}/:revision/impact/:runId`,
      access: { kind: 'project', permission: 'project.read' },
      summary: 'An impact run: state, progress and, when done, current vs draft verdicts per build and check',
      params: RunParams,
      response: ImpactRunDto,
      doc: { tags: ['masks'] },
      async handle(ctx) {
        const { revision, runId } = ctx.params;
        ctx.res.json(toImpactRunDto(await impact.get(ctx.em, await testCaseOf(ctx), revision, runId)));
      },
    }),
    route({
      method: 'post',
      path: `${base}/:revision/reevaluate`,
      access: { kind: 'project', permission: 'mask.approve' },
      summary: 'Re-judge recent captures under the approved revision; new verdicts link to the ones they replace',
      params: RevisionParams,
      body: ReevaluateRequest,
      response: ReevaluateResponse,
      status: 202,
      doc: { tags: ['masks'] },
      async handle(ctx) {
        const { revision } = ctx.params;
        const body = ctx.body;
        ctx.res.status(202).json(await impact.reevaluate(ctx.em, requireProject(ctx), await testCaseOf(ctx), revision, body, requireUser(ctx).user));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/drift',
      access: { kind: 'project', permission: 'build.read' },
      summary: "Check margins over the branch's last driftWindow builds, with a flag where a passing margin shrank by more than driftThresholdDb",
      query: DriftQuery,
      response: DriftResponse,
      doc: { tags: ['dashboard'] },
      async handle(ctx) {
        const q = ctx.query;
        ctx.res.json(await drift.series(ctx.em, requireProject(ctx), q));
      },
    }),
  ];
}
