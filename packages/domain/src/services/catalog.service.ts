import type { EntityManager } from '@mikro-orm/postgresql';
import {
  AnalysisSettings,
  JUDGING_SETTING_FIELDS,
  StimulusSpec,
  type JudgingSettingField,
  type CreateTargetRequest,
  type CreateTestCaseRequest,
  type TargetDto,
  type TestCaseDto,
  type UpdateTargetRequest,
  type UpdateTestCaseRequest,
} from '@earmark/contracts';
import { Capture, MaskRevision, Target, TestCase, testCaseSettings, type Project } from '@earmark/db';
import { actorName, type Principal } from '../actor.js';
import { ConflictError, NotFoundError } from '../errors.js';
import { normalizedSettings } from '../judging/judging-settings.js';
import { changedFields, recordAudit } from './audit.service.js';

export const toTargetDto = (t: Target): TargetDto => ({
  key: t.key,
  name: t.name,
  description: t.description,
  sampleRate: t.sampleRate,
  createdAt: t.createdAt.toISOString(),
});

export const toTestCaseDto = (c: TestCase, hasCaptures: boolean): TestCaseDto => ({
  key: c.key,
  name: c.name,
  description: c.description,
  // Stored JSON was validated on the way in; parsing again fills defaults added since.
  stimulus: StimulusSpec.parse(c.stimulus),
  analysis: AnalysisSettings.parse(c.analysis),
  channelMap: c.channelMap,
  hasCaptures,
  createdAt: c.createdAt.toISOString(),
  updatedAt: c.updatedAt.toISOString(),
});

/** How a refusal names each setting. */
const SETTING_NAMES: Record<JudgingSettingField, string> = { stimulus: 'stimulus', analysis: 'analysis settings', channelMap: 'channel map' };

/** Drafts whose settings are still the test case's own (not edited since they were drafted). */
async function draftsCarrying(em: EntityManager, testCase: TestCase): Promise<MaskRevision[]> {
  const own = JSON.stringify(normalizedSettings(testCaseSettings(testCase)));
  const drafts = await em.find(MaskRevision, { testCase, state: 'draft' });
  return drafts.filter((d) => JSON.stringify(normalizedSettings(d.settings)) === own);
}

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

  /** Test cases as the API answers them, with whether each has captures (one query for all). */
  async presentTestCases(em: EntityManager, testCases: TestCase[]): Promise<TestCaseDto[]> {
    if (testCases.length === 0) return [];
    const rows = await em
      .getConnection()
      .execute<{ id: string }[]>(`select t.id from test_case t where t.id = any(?::uuid[]) and exists (select 1 from capture c where c.test_case_id = t.id)`, [
        `{${testCases.map((t) => t.id).join(',')}}`,
      ]);
    const withCaptures = new Set(rows.map((r) => r.id));
    return testCases.map((t) => toTestCaseDto(t, withCaptures.has(t.id)));
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
   * Name and description are always editable. Stimulus, analysis settings and channel map
   * decide verdicts: once the test case has captures they change only through a reviewed mask
   * revision (they come into force with its approval). Before that (set-up) they may be edited
   * here, and drafts still carrying the old settings follow. Audited with before and after.
   * @throws ConflictError for a settings change once captures exist (nothing is written)
   */
  async updateTestCase(em: EntityManager, project: Project, key: string, input: UpdateTestCaseRequest, principal: Principal): Promise<TestCase> {
    const testCase = await this.getTestCase(em, project, key);
    const current = { name: testCase.name, description: testCase.description, ...normalizedSettings(testCaseSettings(testCase)) };
    const change = changedFields(current, { ...input });
    const settings = JUDGING_SETTING_FIELDS.filter((f) => f in change.after);
    if (settings.length > 0 && (await em.count(Capture, { testCase })) > 0) {
      const names = settings.map((f) => SETTING_NAMES[f]);
      const list = names.length > 1 ? `${names.slice(0, -1).join(', ')} and ${names.at(-1)}` : names[0];
      throw new ConflictError(
        `The ${list} of test case ${key} ${settings.length > 1 ? 'are' : 'is'} under review once captures exist: draft a mask revision with the new settings.`,
        { code: 'settings-under-review' },
      );
    }
    if (Object.keys(change.after).length === 0) return testCase;
    const followers = settings.length > 0 ? await draftsCarrying(em, testCase) : [];
    em.assign(testCase, change.after);
    for (const draft of followers) draft.settings = structuredClone(testCaseSettings(testCase));
    recordAudit(em, {
      actor: actorName(principal),
      action: 'test-case.update',
      subject: `test-case:${key}`,
      project,
      ...(followers.length ? { details: { draftsUpdated: followers.map((d) => d.revision) } } : {}),
      change,
    });
    await em.flush();
    return testCase;
  }
}
