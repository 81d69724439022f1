import { BigIntType, EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';

/** One firmware product line. */
export class Project extends BaseEntity<'description' | 'driftThresholdDb' | 'driftWindow' | 'storageQuotaBytes' | 'archivedAt'> {
  key!: string;
  name!: string;
  description = '';
  /** A passing check whose margin shrank by more than this over the drift window is flagged. */
  driftThresholdDb = 1;
  /** Builds on a branch that the drift of a check is measured over. */
  driftWindow = 10;
  /**
   * Bytes of stored (not purged) capture audio the project may hold; null: the server's default
   * (EARMARK_PROJECT_QUOTA_BYTES), 0: unlimited for this project (domain lifecycle/storage-quota.ts).
   */
  storageQuotaBytes: number | null = null;
  /** When an administrator archived it: it leaves the project lists and accepts no uploads; admins still read it. */
  archivedAt: Date | null = null;
}

export const ProjectSchema = new EntitySchema<Project, BaseEntity>({
  class: Project,
  properties: {
    ...baseProperties,
    key: { type: 'string', length: 40, unique: true },
    name: { type: 'string', length: 120 },
    description: { type: 'text', default: '' },
    driftThresholdDb: { type: 'double', default: 1 },
    driftWindow: { type: 'integer', default: 10 },
    storageQuotaBytes: { type: new BigIntType('number'), nullable: true },
    archivedAt: { type: 'datetime', nullable: true },
  },
});
