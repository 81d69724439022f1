import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Verdict } from './verdict.entity.js';

/** One evaluated check of a mask: measured value, limit, margin (positive = inside). */
export class CheckResult extends BaseEntity<'measured' | 'limit' | 'margin' | 'worstHz' | 'details'> {
  verdict!: Verdict;
  checkId!: string;
  kind!: string;
  pass!: boolean;
  measured: number | null = null;
  limit: number | null = null;
  margin: number | null = null;
  worstHz: number | null = null;
  details: Record<string, unknown> = {};
}

export const CheckResultSchema = new EntitySchema<CheckResult, BaseEntity>({
  class: CheckResult,
  properties: {
    ...baseProperties,
    verdict: { kind: 'm:1', entity: () => Verdict, deleteRule: 'cascade', index: true },
    checkId: { type: 'string', length: 80 },
    kind: { type: 'string', length: 40 },
    pass: { type: 'boolean' },
    measured: { type: 'double', nullable: true },
    limit: { type: 'double', nullable: true },
    margin: { type: 'double', nullable: true },
    worstHz: { type: 'double', nullable: true },
    details: { type: 'json' },
  },
  uniques: [{ properties: ['verdict', 'checkId'] }],
});
