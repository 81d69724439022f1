import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { MaskRevision } from './mask-revision.entity.js';
import { User } from './user.entity.js';

export const impactRunStates = ['queued', 'running', 'done', 'error'] as const;
export type ImpactRunState = (typeof impactRunStates)[number];

/** "What would this revision have said about the last N builds?" — a job with progress. */
export class ImpactRun extends BaseEntity<'state' | 'progress' | 'total' | 'result' | 'error' | 'finishedAt'> {
  maskRevision!: MaskRevision;
  requestedBy!: User;
  builds!: number;
  state: ImpactRunState = 'queued';
  progress = 0;
  total = 0;
  result: Record<string, unknown> | null = null;
  error: string | null = null;
  finishedAt: Date | null = null;
}

export const ImpactRunSchema = new EntitySchema<ImpactRun, BaseEntity>({
  class: ImpactRun,
  properties: {
    ...baseProperties,
    maskRevision: { kind: 'm:1', entity: () => MaskRevision, deleteRule: 'cascade', index: true },
    requestedBy: { kind: 'm:1', entity: () => User },
    builds: { type: 'integer' },
    state: { enum: true, items: () => [...impactRunStates], type: 'string', default: 'queued' },
    progress: { type: 'integer', default: 0 },
    total: { type: 'integer', default: 0 },
    result: { type: 'json', nullable: true },
    error: { type: 'text', nullable: true },
    finishedAt: { type: 'datetime', nullable: true },
  },
});
