import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Build } from './build.entity.js';
import { Project } from './project.entity.js';
import { Target } from './target.entity.js';
import { TestCase } from './test-case.entity.js';

export const captureStatuses = ['queued', 'analysing', 'done', 'error'] as const;
export type CaptureStatus = (typeof captureStatuses)[number];

/** One uploaded buffer for (build, test case, target); the bytes live in object storage. */
export class Capture extends BaseEntity<'format' | 'status' | 'idempotencyKey' | 'purgedAt'> {
  project!: Project;
  build!: Build;
  testCase!: TestCase;
  target!: Target;
  objectKey!: string;
  sha256!: string;
  sizeBytes!: number;
  format: Record<string, unknown> = {};
  sampleRate!: number;
  channelCount!: number;
  frames!: number;
  status: CaptureStatus = 'queued';
  idempotencyKey: string | null = null;
  /** When the retention policy deleted the stored audio (and plots); the row, verdicts and findings stay. */
  purgedAt: Date | null = null;
}

export const CaptureSchema = new EntitySchema<Capture, BaseEntity>({
  class: Capture,
  properties: {
    ...baseProperties,
    project: { kind: 'm:1', entity: () => Project, deleteRule: 'cascade' },
    build: { kind: 'm:1', entity: () => Build, deleteRule: 'cascade', index: true },
    testCase: { kind: 'm:1', entity: () => TestCase },
    target: { kind: 'm:1', entity: () => Target },
    objectKey: { type: 'string', length: 300 },
    sha256: { type: 'string', length: 64 },
    sizeBytes: { type: 'integer' },
    format: { type: 'json' },
    sampleRate: { type: 'integer' },
    channelCount: { type: 'integer' },
    frames: { type: 'integer' },
    status: { enum: true, items: () => [...captureStatuses], type: 'string', default: 'queued' },
    idempotencyKey: { type: 'string', length: 200, nullable: true },
    purgedAt: { type: 'datetime', nullable: true },
  },
  // An Idempotency-Key names one capture per project, never a duplicate.
  uniques: [{ properties: ['project', 'idempotencyKey'] }],
  // The builds table's target filter, and "last passing capture" look-ups.
  indexes: [
    { name: 'capture_target_build_idx', properties: ['target', 'build'] },
    { name: 'capture_test_case_target_idx', properties: ['testCase', 'target'] },
    // A project's waiting captures in order: the job producer's fair priority counts them (domain jobs/fair-priority.ts).
    { name: 'capture_queued_project_idx', expression: `create index "capture_queued_project_idx" on "capture" ("project_id", "created_at", "id") where "status" = 'queued'` },
    // A project's stored bytes in one index-only sum: the storage quota check at every upload (domain lifecycle/storage-quota.ts).
    { name: 'capture_stored_size_idx', expression: `create index "capture_stored_size_idx" on "capture" ("project_id") include ("size_bytes") where "purged_at" is null` },
    // "Does a row hold this object?": the orphan clean-up asks it for every object it lists.
    { name: 'capture_object_key_idx', properties: ['objectKey'] },
  ],
});
