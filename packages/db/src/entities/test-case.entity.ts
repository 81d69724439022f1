import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Project } from './project.entity.js';

/**
 * A test case: key, stimulus spec, analysis settings and channel map. The JSON columns
 * are validated by the contracts' zod schemas at the API boundary before they get here.
 */
export class TestCase extends BaseEntity<'description' | 'analysis' | 'channelMap' | 'updatedAt'> {
  project!: Project;
  key!: string;
  name!: string;
  description = '';
  stimulus!: Record<string, unknown>;
  analysis: Record<string, unknown> = {};
  channelMap: number[] = [];
  updatedAt: Date = new Date();
}

/**
 * Stimulus, analysis settings and channel map as stored JSON: what decides a verdict besides
 * the mask. Mask revisions and verdicts keep their own copy (see MaskRevision.settings).
 */
export interface StoredJudgingSettings {
  stimulus: Record<string, unknown>;
  analysis: Record<string, unknown>;
  channelMap: number[];
}

/** The test case's own settings, as a new draft snapshots them. */
export const testCaseSettings = (testCase: Pick<TestCase, 'stimulus' | 'analysis' | 'channelMap'>): StoredJudgingSettings => ({
  stimulus: testCase.stimulus,
  analysis: testCase.analysis,
  channelMap: testCase.channelMap,
});

export const TestCaseSchema = new EntitySchema<TestCase, BaseEntity>({
  class: TestCase,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    key: { type: 'string', length: 80 },
    name: { type: 'string', length: 160 },
    description: { type: 'text', default: '' },
    stimulus: { type: 'json' },
    analysis: { type: 'json' },
    channelMap: { type: 'json' },
    updatedAt: { type: 'datetime', onCreate: () => new Date(), onUpdate: () => new Date() },
  },
  uniques: [{ properties: ['project', 'key'] }],
});
