import {
  CreateTargetRequest,
  CreateTestCaseRequest,
  StimulusSpec,
  TargetDto,
  TargetKey,
  TestCaseDto,
  TestCaseKey,
  UpdateTargetRequest,
  UpdateTestCaseRequest,
} from '@earmark/contracts';
import { z } from 'zod';
import { type CatalogService, parseWith, type StimulusFiles, toTargetDto, toTestCaseDto } from '@earmark/domain';
import { sendWav } from '../http/send-wav.js';
import { requireProject, type RouteContext, route, type RouteDef } from '../http/route.js';

const TargetParams = z.object({ targetKey: TargetKey });
const CaseParams = z.object({ caseKey: TestCaseKey });

export const LOUDNESS_CAUTION =
  'Test signals can be loud: playing them through loudspeakers or headphones can damage hearing and drivers. Start at a low level.';

/** The stored stimulus of a test case (generated in a compute thread the first time), streamed. */
async function sendStimulus(ctx: RouteContext, catalog: CatalogService, stimuli: StimulusFiles): Promise<void> {
  const { caseKey } = parseWith(CaseParams, ctx.req.params, 'params');
  const testCase = await catalog.getTestCase(ctx.em, requireProject(ctx), caseKey);
  // 32-bit float: what the rig plays matches the generated signal to about −150 dB, far below any mask.
  const wav = await stimuli.open(StimulusSpec.parse(testCase.stimulus));
  await sendWav(ctx.res, wav, { 'Content-Disposition': `attachment; filename="${testCase.key}.wav"`, 'X-Earmark-Caution': LOUDNESS_CAUTION });
}

export function catalogRoutes(catalog: CatalogService, stimuli: StimulusFiles): RouteDef[] {
  const presentOne = async (ctx: RouteContext, testCase: Parameters<typeof toTestCaseDto>[0]) => (await catalog.presentTestCases(ctx.em, [testCase]))[0]!;
  return [
    route({
      method: 'get',
      path: '/api/projects/:project/targets',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'Targets (hardware or configuration variants) of a project',
      response: z.object({ items: z.array(TargetDto) }),
      async handle(ctx) {
        ctx.res.json({ items: (await catalog.listTargets(ctx.em, requireProject(ctx))).map(toTargetDto) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/targets',
      access: { kind: 'project', permission: 'project.configure' },
      summary: 'Add a target',
      body: CreateTargetRequest,
      response: TargetDto,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.status(201).json(toTargetDto(await catalog.createTarget(ctx.em, requireProject(ctx), body, ctx.principal!)));
      },
    }),
    route({
      method: 'patch',
      path: '/api/projects/:project/targets/:targetKey',
      access: { kind: 'project', permission: 'project.configure' },
      summary: "Change a target's name, description or sample rate",
      params: TargetParams,
      body: UpdateTargetRequest,
      response: TargetDto,
      async handle(ctx) {
        const { targetKey } = ctx.params;
        const body = ctx.body;
        ctx.res.json(toTargetDto(await catalog.updateTarget(ctx.em, requireProject(ctx), targetKey, body, ctx.principal!)));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/test-cases',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'Test cases of a project with their stimulus specs and analysis settings',
      response: z.object({ items: z.array(TestCaseDto) }),
      async handle(ctx) {
        ctx.res.json({ items: await catalog.presentTestCases(ctx.em, await catalog.listTestCases(ctx.em, requireProject(ctx))) });
      },
    }),
    route({
      method: 'post',
      path: '/api/projects/:project/test-cases',
      access: { kind: 'project', permission: 'project.configure' },
      summary: 'Add a test case',
      body: CreateTestCaseRequest,
      response: TestCaseDto,
      status: 201,
      async handle(ctx) {
        const body = ctx.body;
        ctx.res.status(201).json(toTestCaseDto(await catalog.createTestCase(ctx.em, requireProject(ctx), body, ctx.principal!), false));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/test-cases/:caseKey',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'One test case',
      params: CaseParams,
      response: TestCaseDto,
      async handle(ctx) {
        const { caseKey } = ctx.params;
        ctx.res.json(await presentOne(ctx, await catalog.getTestCase(ctx.em, requireProject(ctx), caseKey)));
      },
    }),
    route({
      method: 'patch',
      path: '/api/projects/:project/test-cases/:caseKey',
      access: { kind: 'project', permission: 'project.configure' },
      summary: 'Change a test case; stimulus, analysis settings and channel map only while it has no captures (afterwards through a mask revision: 409)',
      params: CaseParams,
      body: UpdateTestCaseRequest,
      response: TestCaseDto,
      async handle(ctx) {
        const { caseKey } = ctx.params;
        const body = ctx.body;
        ctx.res.json(await presentOne(ctx, await catalog.updateTestCase(ctx.em, requireProject(ctx), caseKey, body, ctx.principal!)));
      },
    }),
    route({
      method: 'get',
      path: '/api/projects/:project/test-cases/:caseKey/stimulus.wav',
      access: { kind: 'project', permission: 'project.read' },
      summary: 'The exact stimulus a rig must play, as 32-bit float WAV (loud: see the caution header)',
      doc: { responseContentType: 'audio/wav' },
      handle: (ctx) => sendStimulus(ctx, catalog, stimuli),
    }),
    route({
      method: 'get',
      path: '/api/v1/projects/:project/test-cases/:caseKey/stimulus.wav',
      access: { kind: 'ci', permission: 'build.read' },
      summary: 'The stimulus for rigs and pipelines (CI token)',
      doc: { responseContentType: 'audio/wav' },
      handle: (ctx) => sendStimulus(ctx, catalog, stimuli),
    }),
  ];
}
