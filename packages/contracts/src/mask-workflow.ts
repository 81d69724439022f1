import { z } from 'zod';
import { TargetKey } from './captures.js';
import { JudgingSettings } from './judging-settings.js';
import { MaskRevisionDto, MaskRevisionState } from './mask-revisions.js';

/*
 * The review workflow of mask revisions and the waivers of failing checks.
 * Routes (all under /api/projects/:project):
 *   GET    masks?state=in_review                         ProjectMaskRevisionsQuery → { items: MaskRevisionDto[] }
 *   GET    test-cases/:caseKey/masks/:revision           → MaskRevisionDto
 *   PATCH  test-cases/:caseKey/masks/:revision           UpdateMaskDraftRequest → MaskRevisionDto (drafts only)
 *   POST   test-cases/:caseKey/masks/:revision/submit    → MaskRevisionDto
 *   POST   test-cases/:caseKey/masks/:revision/approve   MaskDecisionRequest → MaskRevisionDto
 *   POST   test-cases/:caseKey/masks/:revision/reject    MaskRejectRequest → MaskRevisionDto
 *   POST   test-cases/:caseKey/masks/:revision/copy      CopyMaskRevisionRequest → MaskRevisionDto (201)
 *   GET    test-cases/:caseKey/masks/:revision/diff?base  MaskDiffQuery → MaskDiff
 *   GET    test-cases/:caseKey/masks/:revision/history   → MaskHistory
 *   GET    audit?actor&action&entity&page&pageSize        ProjectAuditQuery → ProjectAuditPage
 *   POST   findings/:id/waivers                          RequestWaiverRequest → WaiverDto (201)
 *   GET    waivers?state                                 WaiverListQuery → WaiverList
 *   POST   waivers/:id/approve                           WaiverDecisionRequest → WaiverDto
 *   POST   waivers/:id/reject                            WaiverRejectRequest → WaiverDto
 *   POST   waivers/:id/revoke                            WaiverRevokeRequest → WaiverDto
 */

/** Only drafts can change; every field is optional, at least one must be given. */
export const UpdateMaskDraftRequest = z
  .strictObject({
    /** Validated as a MaskDocument by the API. */
    checks: z.array(z.unknown()).optional(),
    note: z.string().max(4000).optional(),
    target: TargetKey.nullable().optional(),
    /** The settings this revision judges with; fields left out keep the draft's. */
    settings: JudgingSettings.partial().optional(),
  })
  .refine((b) => b.checks !== undefined || b.note !== undefined || b.target !== undefined || b.settings !== undefined, {
    message: 'give checks, note, target or settings',
  });
export type UpdateMaskDraftRequest = z.infer<typeof UpdateMaskDraftRequest>;

/** Approving takes an optional comment. */
export const MaskDecisionRequest = z.strictObject({ comment: z.string().trim().max(4000).optional() });
export type MaskDecisionRequest = z.infer<typeof MaskDecisionRequest>;

/** Rejecting needs a comment that says why. */
export const MaskRejectRequest = z.strictObject({ comment: z.string().trim().min(1, 'say why the revision is rejected').max(4000) });
export type MaskRejectRequest = z.infer<typeof MaskRejectRequest>;

/** Copy any revision to a new draft; the note defaults to "Copy of revision N". */
export const CopyMaskRevisionRequest = z.strictObject({
  note: z.string().max(4000).optional(),
  /** Defaults to the source revision's target. */
  target: TargetKey.nullable().optional(),
});
export type CopyMaskRevisionRequest = z.infer<typeof CopyMaskRevisionRequest>;

export const ProjectMaskRevisionsQuery = z.object({ state: MaskRevisionState.optional() });
export type ProjectMaskRevisionsQuery = z.infer<typeof ProjectMaskRevisionsQuery>;

/** `base` defaults to the revision this one was copied from, else the one before it. */
export const MaskDiffQuery = z.object({ base: z.coerce.number().int().min(1).optional() });
export type MaskDiffQuery = z.infer<typeof MaskDiffQuery>;

export const CheckDiffStatus = z.enum(['added', 'removed', 'changed', 'unchanged']);
export type CheckDiffStatus = z.infer<typeof CheckDiffStatus>;

/** One field of a check that differs; `path` is dotted, e.g. `upper.2.db` for a moved limit point. */
export const CheckFieldChange = z.object({
  path: z.string(),
  before: z.unknown(),
  after: z.unknown(),
});
export type CheckFieldChange = z.infer<typeof CheckFieldChange>;

/** Checks are matched by id; `before`/`after` are the whole checks (null where absent). */
export const CheckDiff = z.object({
  id: z.string(),
  kind: z.string(),
  status: CheckDiffStatus,
  changes: z.array(CheckFieldChange),
  before: z.record(z.string(), z.unknown()).nullable(),
  after: z.record(z.string(), z.unknown()).nullable(),
});
export type CheckDiff = z.infer<typeof CheckDiff>;

export const MaskDiff = z.object({
  testCase: z.string(),
  base: z.object({ revision: z.number().int(), state: MaskRevisionState, target: z.string().nullable() }),
  head: z.object({ revision: z.number().int(), state: MaskRevisionState, target: z.string().nullable() }),
  /** In the head's check order, then the removed ones in the base's order. */
  checks: z.array(CheckDiff),
  summary: z.object({ added: z.number().int(), removed: z.number().int(), changed: z.number().int(), unchanged: z.number().int() }),
  /** The note or target differ, besides the checks. */
  noteChanged: z.boolean(),
  targetChanged: z.boolean(),
  /**
   * Stimulus, analysis and channel-map fields that differ (`stimulus.frequency`, `analysis.transferMethod`,
   * `channelMap` as a whole): they change verdicts as much as the checks do.
   */
  settingsChanges: z.array(CheckFieldChange),
});
export type MaskDiff = z.infer<typeof MaskDiff>;

/** One entry of an audit trail: a state transition (or an edit) of a revision or waiver. */
export const AuditTrailEntry = z.object({
  id: z.string(),
  at: z.string(),
  /** `user:<email>`, `token:<prefix>` or `system:<what>` (e.g. the sweeper expiring waivers). */
  actor: z.string(),
  action: z.string(),
  fromState: z.string().nullable(),
  toState: z.string().nullable(),
  comment: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
});
export type AuditTrailEntry = z.infer<typeof AuditTrailEntry>;

/** A revision's trail, oldest first. */
export const MaskHistory = z.object({
  testCase: z.string(),
  revision: z.number().int(),
  items: z.array(AuditTrailEntry),
});
export type MaskHistory = z.infer<typeof MaskHistory>;

export const ProjectAuditQuery = z.object({
  /** Exact actor, e.g. `user:qa@example.test`. */
  actor: z.string().max(300).optional(),
  /** Exact action (`mask.approve`) or a prefix ending in a dot (`waiver.`). */
  action: z.string().max(80).optional(),
  /** Entity kind (`mask`, `waiver`, `finding`, …) or a full subject (`mask:eq.sweep#3`, `waiver:<id>`). */
  entity: z.string().max(300).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type ProjectAuditQuery = z.infer<typeof ProjectAuditQuery>;

/** A project audit row: the trail entry plus its subject, newest first. */
export const ProjectAuditRow = AuditTrailEntry.extend({ subject: z.string() });
export type ProjectAuditRow = z.infer<typeof ProjectAuditRow>;

export const ProjectAuditPage = z.object({
  items: z.array(ProjectAuditRow),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});
export type ProjectAuditPage = z.infer<typeof ProjectAuditPage>;

export const WaiverState = z.enum(['requested', 'approved', 'rejected', 'expired', 'revoked']);
export type WaiverState = z.infer<typeof WaiverState>;

export const RequestWaiverRequest = z.strictObject({
  reason: z.string().trim().min(1, 'say why the deviation is acceptable').max(4000),
  /** ISO date or date-time; must lie in the future. A bare date means the end of that day (UTC). */
  until: z.union([z.iso.date(), z.iso.datetime({ offset: true })]),
  /** true: only the finding's target; false (default): the check on every target of the test case. */
  targetOnly: z.boolean().default(false),
});
export type RequestWaiverRequest = z.infer<typeof RequestWaiverRequest>;

export const WaiverDecisionRequest = z.strictObject({ comment: z.string().trim().max(4000).optional() });
export type WaiverDecisionRequest = z.infer<typeof WaiverDecisionRequest>;

export const WaiverRejectRequest = z.strictObject({ comment: z.string().trim().min(1, 'say why the waiver is rejected').max(4000) });
export type WaiverRejectRequest = z.infer<typeof WaiverRejectRequest>;

/** Revoking an approved waiver before its date takes a reason. */
export const WaiverRevokeRequest = z.strictObject({ reason: z.string().trim().min(1, 'say why the waiver is revoked').max(4000) });
export type WaiverRevokeRequest = z.infer<typeof WaiverRevokeRequest>;

export const WaiverListQuery = z.object({
  /** `active`: approved and not yet expired. */
  state: z.union([WaiverState, z.literal('active')]).optional(),
});
export type WaiverListQuery = z.infer<typeof WaiverListQuery>;

export const WaiverDto = z.object({
  id: z.string(),
  project: z.string(),
  testCase: z.string(),
  /** null: the check on every target. */
  target: z.string().nullable(),
  checkId: z.string(),
  reason: z.string(),
  until: z.string(),
  state: WaiverState,
  /** Approved and not past `until`. */
  active: z.boolean(),
  requestedBy: z.string(),
  decidedBy: z.string().nullable(),
  decidedAt: z.string().nullable(),
  decisionComment: z.string().nullable(),
  findingId: z.string().nullable(),
  createdAt: z.string(),
});
export type WaiverDto = z.infer<typeof WaiverDto>;

export const WaiverList = z.object({ items: z.array(WaiverDto) });
export type WaiverList = z.infer<typeof WaiverList>;

export const ProjectMaskRevisionList = z.object({ items: z.array(MaskRevisionDto) });
export type ProjectMaskRevisionList = z.infer<typeof ProjectMaskRevisionList>;

/** What a waived check carries in `details.waived` of its stored result. */
export const WaivedCheckDetails = z.object({ waiverId: z.string(), until: z.string() });
export type WaivedCheckDetails = z.infer<typeof WaivedCheckDetails>;
