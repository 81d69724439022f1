import { EntitySchema } from '@mikro-orm/core';
import { BaseEntity, baseProperties } from './base.js';
import { Capture } from './capture.entity.js';
import { MaskRevision } from './mask-revision.entity.js';
import type { StoredJudgingSettings } from './test-case.entity.js';

export const verdictOutcomes = ['pass', 'fail', 'error'] as const;
export type VerdictOutcome = (typeof verdictOutcomes)[number];

/** The verdict for one capture under one mask revision, reproducible from both versions. */
export class Verdict extends BaseEntity<'maskRevision' | 'reason' | 'previous' | 'settings' | 'waiverBasis'> {
  capture!: Capture;
  maskRevision: MaskRevision | null = null;
  outcome!: VerdictOutcome;
  reason: string | null = null;
  engineVersion!: string;
  /** For a re-evaluation (a newer revision or engine): the verdict it replaces as the newest. */
  previous: Verdict | null = null;
  /** The stimulus, analysis settings and channel map it was judged with; null on verdicts recorded before they were. */
  settings: StoredJudgingSettings | null = null;
  /**
   * The waivers this verdict was judged with: their ids, sorted and comma-separated ('' for
   * none); a verdict written because a waiver changed adds `;approved=<id>`, `;revoked=<id>` or
   * `;expired=<id>`. A waiver changing re-judges a capture under the same revision and engine;
   * the basis keeps those verdicts apart in the unique index.
   */
  waiverBasis = '';
}

export const VerdictSchema = new EntitySchema<Verdict, BaseEntity>({
  class: Verdict,
  properties: {
    ...baseProperties,
    capture: { kind: 'm:1', entity: () => Capture, deleteRule: 'cascade' },
    maskRevision: { kind: 'm:1', entity: () => MaskRevision, nullable: true },
    outcome: { enum: true, items: () => [...verdictOutcomes], type: 'string' },
    reason: { type: 'text', nullable: true },
    engineVersion: { type: 'string', length: 40 },
    previous: { kind: 'm:1', entity: () => Verdict, nullable: true, deleteRule: 'set null' },
    settings: { type: 'json', nullable: true },
    waiverBasis: { type: 'text', default: '' },
  },
  // One verdict per capture, mask revision, engine version and waiver basis: re-evaluating
  // under a newer engine or a waiver changing adds a verdict, a re-run job does not. NULLS NOT
  // DISTINCT: a capture judged with no mask in force still gets one verdict per engine only.
  indexes: [
    {
      name: 'verdict_capture_mask_revision_engine_waivers_unique',
      expression:
        'create unique index "verdict_capture_mask_revision_engine_waivers_unique" on "verdict" ("capture_id", "mask_revision_id", "engine_version", "waiver_basis") nulls not distinct',
    },
  ],
});
