import type { EntityManager } from '@mikro-orm/postgresql';
import {
  AnalysisSettings,
  StimulusSpec,
  type CreateTargetRequest,
  type CreateTestCaseRequest,
  type TargetDto,
  type TestCaseDto,
  type UpdateTargetRequest,
  type UpdateTestCaseRequest,
} from '@earmark/contracts';
import { Capture, Target, TestCase, type Project } from '@earmark/db';
import { actorName, type Principal } from '../actor.js';
import { ConflictError, NotFoundError } from '../errors.js';
import { recordAudit } from './audit.service.js';

export const toTargetDto = (t: Target): TargetDto => ({
  key: t.key,
  name: t.name,
  description: t.description,
  sampleRate: t.sampleRate,
  createdAt: t.createdAt.toISOString(),
});

export const toTestCaseDto = (c: TestCase): TestCaseDto => ({
  key: c.key,
  name: c.name,
  description: c.description,
  // Stored JSON was validated on the way in; parsing again fills defaults added since.
  stimulus: StimulusSpec.parse(c.stimulus),
  analysis: AnalysisSettings.parse(c.analysis),
  channelMap: c.channelMap,
  createdAt: c.createdAt.toISOString(),
  updatedAt: c.updatedAt.toISOString(),
});

/** Targets and test cases of a project (engineers and above edit them). */
export class CatalogService {
  listTargets(em: EntityManager, project: Project) {
    return em.find(Target, { project }, { orderBy: { key: 'asc' } });
  }

  async getTarget(em: EntityManager, project: Project, key: string): Promise<Target> {
    const target = await em.findOne(Target, { project, key });
    if (!target) throw new NotFoundError(`Project ${project.key} has no target ${key}.`);
    return target;
  }

  async createTarget(em: EntityManager, project: Project, input: CreateTargetRequest, principal: Principal): Promise<Target> {
    if (await em.findOne(Target, { project, key: input.key })) throw new ConflictError(`Target ${input.key} already exists in ${project.key}.`);
    const target = em.create(Target, { project, ...input });
    recordAudit(em, { actor: actorName(principal), action: 'target.create', subject: `target:${input.key}`, project });
    await em.flush();
    return target;
  }

  async updateTarget(em: EntityManager, project: Project, key: string, input: UpdateTargetRequest, principal: Principal): Promise<Target> {
    const target = await this.getTarget(em, project, key);
    em.assign(target, Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)));
    recordAudit(em, { actor: actorName(principal), action: 'target.update', subject: `target:${key}`, project, details: input });
    await em.flush();
    return target;
  }

  listTestCases(em: EntityManager, project: Project) {
    return em.find(TestCase, { project }, { orderBy: { key: 'asc' } });
  }

  async getTestCase(em: EntityManager, project: Project, key: string): Promise<TestCase> {
    const testCase = await em.findOne(TestCase, { project, key });
    if (!testCase) throw new NotFoundError(`Project ${project.key} has no test case ${key}.`);
    return testCase;
  }

  async createTestCase(em: EntityManager, project: Project, input: CreateTestCaseRequest, principal: Principal): Promise<TestCase> {
    if (await em.findOne(TestCase, { project, key: input.key })) throw new ConflictError(`Test case ${input.key} already exists in ${project.key}.`);
    const testCase = em.create(TestCase, { project, ...input });
    recordAudit(em, { actor: actorName(principal), action: 'test-case.create', subject: `test-case:${input.key}`, project });
    await em.flush();
    return testCase;
  }

  /**
   * Changing the stimulus of a test case that already has captures would make their
   * verdicts irreproducible, so that is refused; name and settings may change.
   */
  async updateTestCase(em: EntityManager, project: Project, key: string, input: UpdateTestCaseRequest, principal: Principal): Promise<TestCase> {
    const testCase = await this.getTestCase(em, project, key);
    if (input.stimulus && JSON.stringify(input.stimulus) !== JSON.stringify(StimulusSpec.parse(testCase.stimulus))) {
      if ((await em.count(Capture, { testCase })) > 0) {
        throw new ConflictError(`Test case ${key} already has captures; create a new test case for a new stimulus.`);
      }
    }
    em.assign(testCase, Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)));
    recordAudit(em, { actor: actorName(principal), action: 'test-case.update', subject: `test-case:${key}`, project });
    await em.flush();
    return testCase;
  }
}
