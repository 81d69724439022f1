import type { EntityManager } from '@mikro-orm/postgresql';
import {
  JudgingSettings,
  MaskCheck,
  MaskDocument,
  type AuditTrailEntry,
  type CheckDiff,
  type CheckFieldChange,
  type CopyMaskRevisionRequest,
  type MaskDiff,
  type MaskHistory,
  type MaskRevisionState,
  type ProjectAuditPage,
  type ProjectAuditQuery,
  type UpdateMaskDraftRequest,
} from '@earmark/contracts';
import { AuditEvent, MaskRevision, type Project, type StoredJudgingSettings, type TestCase, type User } from '@earmark/db';
import { ConflictError, NotFoundError } from '../errors.js';
import { assertMayDecide, assertMayEditDraft, assertMaySubmit, contributorsOf, maskUnderReview, withContributor } from '../rules/four-eyes.js';
import { normalizedSettings } from '../judging/judging-settings.js';
import { parseWith } from '../validate.js';
import { assertAcceptanceChecks, withoutSelfTests } from '../rules/acceptance-checks.js';
import type { Links } from './links.js';
import { changedFields } from './audit.service.js';
import { MASK_POPULATE, maskSubject, recordMaskTransition, type MaskService } from './mask.service.js';
import { mailMaskDecision } from './mask-decision-mail.js';
import { composeMaskReviewMail } from '../mail/mask-review.mail.js';
import { writeToOutbox } from '../mail/outbox.js';
import { qaManagersOf } from '../mail/recipients.js';
import { MASK_REVISION, moveTo } from '../rules/state-machines.js';

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Field-by-field differences of two JSON values, as dotted paths (`upper.2.db`). */
export function diffValues(before: unknown, after: unknown, path: string, out: CheckFieldChange[]): void {
  if (isRecord(before) && isRecord(after)) {
    const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])];
    for (const k of keys) diffValues(before[k], after[k], path ? `${path}.${k}` : k, out);
    return;
  }
  if (Array.isArray(before) && Array.isArray(after)) {
    for (let i = 0; i < Math.max(before.length, after.length); i++) diffValues(before[i], after[i], `${path}.${i}`, out);
    return;
  }
  if (JSON.stringify(before) !== JSON.stringify(after)) out.push({ path, before: before ?? null, after: after ?? null });
}

/**
 * Check-by-check comparison, matched by check id. Checks go through the schema first so
 * fields come in its order (the database stores JSON with its keys re-ordered).
 */
export function diffChecks(baseChecks: unknown[], headChecks: unknown[]): CheckDiff[] {
  const asChecks = (list: unknown[]) =>
    list.map((c) => {
      const parsed = MaskCheck.safeParse(c);
      return parsed.success ? (parsed.data as Record<string, unknown>) : c;
    }).filter(isRecord);
  const base = new Map(asChecks(baseChecks).map((c) => [String(c.id), c]));
  const head = asChecks(headChecks);
  const headIds = new Set(head.map((c) => String(c.id)));
  const result: CheckDiff[] = head.map((after) => {
    const id = String(after.id);
    const before = base.get(id) ?? null;
    if (!before) return { id, kind: String(after.kind), status: 'added', changes: [], before: null, after };
    const changes: CheckFieldChange[] = [];
    diffValues(before, after, '', changes);
    return { id, kind: String(after.kind), status: changes.length ? 'changed' : 'unchanged', changes, before, after };
  });
  for (const [id, before] of base) {
    if (!headIds.has(id)) result.push({ id, kind: String(before.kind), status: 'removed', changes: [], before, after: null });
  }
  return result;
}

/**
 * What differs between two revisions' settings: stimulus and analysis field by field
 * (`stimulus.frequency`), the channel map as a whole (`[0, 1]` → `[1]` reads better than per index).
 */
export function diffSettings(base: StoredJudgingSettings, head: StoredJudgingSettings): CheckFieldChange[] {
  const before = normalizedSettings(base);
  const after = normalizedSettings(head);
  const out: CheckFieldChange[] = [];
  diffValues(before.stimulus, after.stimulus, 'stimulus', out);
  diffValues(before.analysis, after.analysis, 'analysis', out);
  if (JSON.stringify(before.channelMap) !== JSON.stringify(after.channelMap)) out.push({ path: 'channelMap', before: before.channelMap, after: after.channelMap });
  return out;
}

const str = (v: unknown) => (typeof v === 'string' ? v : null);

export function toTrailEntry(e: AuditEvent): AuditTrailEntry {
  return {
    id: e.id,
    at: e.createdAt.toISOString(),
    actor: e.actor,
    action: e.action,
    fromState: str(e.details.from),
    toState: str(e.details.to),
    comment: str(e.details.comment),
    details: e.details,
  };
}

const likeLiteral = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * The review workflow of mask revisions: edit while draft, submit for review, approve
 * (MaskService) or reject with a comment, copy any revision to a new draft, diff two
 * revisions and read a revision's history. A submitted revision never changes again.
 */
export class MaskWorkflowService {
  constructor(
    private readonly masks: MaskService,
    private readonly pages: Links,
  ) {}

  listForProject(em: EntityManager, project: Project, state: MaskRevisionState | undefined) {
    return em.find(
      MaskRevision,
      { testCase: { project }, ...(state ? { state } : {}) },
      { populate: MASK_POPULATE, orderBy: { createdAt: 'desc' }, limit: 500 },
    );
  }

  /**
   * Changes a draft; only its author may. The audit event records the changed fields' values
   * before and after, and the editor joins the revision's contributors.
   * @throws ConflictError unless the revision is a draft; ForbiddenError for anyone but the author.
   */
  async updateDraft(em: EntityManager, project: Project, testCase: TestCase, revision: number, input: UpdateMaskDraftRequest, actor: User): Promise<MaskRevision> {
    const mask = await this.masks.get(em, testCase, revision);
    assertDraft(mask, 'changed');
    assertMayEditDraft(mask, actor);
    const before = editableFields(mask);
    if (input.checks !== undefined) {
      mask.checks = parseWith(MaskDocument, { checks: input.checks }, 'body').checks;
      assertAcceptanceChecks(mask.checks);
    }
    if (input.note !== undefined) {
      mask.note = input.note;
    }
    if (input.target !== undefined) {
      mask.target = await this.masks.resolveTarget(em, project, input.target);
    }
    let settingsChanges: CheckFieldChange[] = [];
    if (input.settings !== undefined) {
      // Fields left out keep the draft's; the whole result must still be valid settings.
      const settings = parseWith(JudgingSettings, { ...normalizedSettings(mask.settings), ...input.settings }, 'body') as unknown as StoredJudgingSettings;
      settingsChanges = diffSettings(mask.settings, settings);
      mask.settings = settings;
    }
    mask.contributors = withContributor(contributorsOf(mask), actor);
    recordMaskTransition(em, project, mask, {
      actor,
      action: 'mask.edit',
      from: 'draft',
      to: 'draft',
      details: settingsChanges.length ? { settingsChanges } : {},
      change: changedFields(before, editableFields(mask)),
    });
    await em.flush();
    return mask;
  }

  /** Draft → in review; the project's QA managers get mail. @throws ConflictError unless it is a draft. */
  async submit(em: EntityManager, project: Project, testCase: TestCase, revision: number, actor: User): Promise<{ mask: MaskRevision; mailed: number }> {
    return em.transactional(async (tx) => {
      const mask = await this.masks.get(tx, testCase, revision);
      assertDraft(mask, 'submitted');
      assertMaySubmit(mask, actor);
      // A draft saved before the self-test rule must lose the self-test before review.
      assertAcceptanceChecks(mask.checks);
      moveTo(MASK_REVISION, mask, 'in_review', 'person');
      mask.submittedAt = new Date();
      recordMaskTransition(tx, project, mask, { actor, action: 'mask.submit', from: 'draft', to: 'in_review' });
      const review = composeMaskReviewMail({
        project,
        testCase: testCase.key,
        revision: mask.revision,
        target: mask.target?.key ?? null,
        submittedBy: actor,
        author: mask.author,
        checkCount: mask.checks.length,
        basedOn: mask.basedOn?.revision ?? null,
        note: mask.note,
        masksPage: this.pages.masksPage(project.key, testCase.key),
        approvalsPage: this.pages.approvalsPage(project.key),
      });
      const mailed = writeToOutbox(tx, review, await qaManagersOf(tx, project, [actor, mask.author]));
      await tx.flush();
      return { mask, mailed };
    });
  }

  /**
   * In review → rejected, with the reviewer's reason.
   * @throws ForbiddenError for anyone who wrote or edited it; ConflictError unless it is in review.
   */
  async reject(em: EntityManager, project: Project, testCase: TestCase, revision: number, reviewer: User, comment: string): Promise<MaskRevision> {
    const mask = await this.masks.get(em, testCase, revision);
    assertMayDecide(maskUnderReview(mask), reviewer, 'rejected');
    if (mask.state !== 'in_review') throw new ConflictError(`Revision ${revision} is ${mask.state}; only revisions in review can be rejected.`);
    moveTo(MASK_REVISION, mask, 'rejected', 'person');
    mask.reviewer = reviewer;
    mask.decidedAt = new Date();
    mask.decisionComment = comment;
    recordMaskTransition(em, project, mask, { actor: reviewer, action: 'mask.reject', from: 'in_review', to: 'rejected', comment });
    mailMaskDecision(em, project, mask, this.pages);
    await em.flush();
    return mask;
  }

  /** Any revision → a new draft with the same checks and settings, remembering where it came from. */
  async copy(em: EntityManager, project: Project, testCase: TestCase, revision: number, input: CopyMaskRevisionRequest, author: User): Promise<MaskRevision> {
    const source = await this.masks.get(em, testCase, revision);
    // A revision stored before the self-test rule is copied without it; the note says so.
    const { kept, left } = withoutSelfTests(source.checks as { id?: unknown }[]);
    const leftOut = left.length ? ` (left out the engine self-test ${left.map((id) => `“${id}”`).join(', ')}: not an acceptance check)` : '';
    const draft = await this.masks.createDraft(
      em,
      project,
      testCase,
      {
        checks: kept,
        note: (input.note ?? `Copy of revision ${source.revision}${source.note ? `: ${source.note}` : ''}`).concat(leftOut).slice(0, 4000),
        target: input.target === undefined ? (source.target?.key ?? null) : input.target,
      },
      author,
      source,
      source.settings,
    );
    return this.masks.get(em, testCase, draft.revision);
  }

  /** What changed from `base` (default: the revision it was copied from, else the one before) to `revision`. */
  async diff(em: EntityManager, testCase: TestCase, revision: number, baseRevision: number | undefined): Promise<MaskDiff> {
    const head = await this.masks.get(em, testCase, revision);
    const baseNumber = baseRevision ?? head.basedOn?.revision ?? revision - 1;
    if (baseNumber < 1) throw new NotFoundError(`Revision ${revision} of ${testCase.key} is the first; give ?base= to compare it with another.`);
    const base = await this.masks.get(em, testCase, baseNumber);
    const checks = diffChecks(base.checks, head.checks);
    const count = (s: CheckDiff['status']) => checks.filter((c) => c.status === s).length;
    const side = (m: MaskRevision) => ({ revision: m.revision, state: m.state, target: m.target?.key ?? null });
    return {
      testCase: testCase.key,
      base: side(base),
      head: side(head),
      checks,
      summary: { added: count('added'), removed: count('removed'), changed: count('changed'), unchanged: count('unchanged') },
      noteChanged: base.note !== head.note,
      targetChanged: (base.target?.id ?? null) !== (head.target?.id ?? null),
      settingsChanges: diffSettings(base.settings, head.settings),
    };
  }

  /** Every recorded transition of one revision, oldest first. */
  async history(em: EntityManager, project: Project, testCase: TestCase, revision: number): Promise<MaskHistory> {
    const mask = await this.masks.get(em, testCase, revision);
    const events = await em.find(AuditEvent, { project, subject: maskSubject(testCase, mask.revision) }, { orderBy: { createdAt: 'asc', id: 'asc' } });
    return { testCase: testCase.key, revision: mask.revision, items: events.map(toTrailEntry) };
  }

  /** The project's audit log, newest first, filtered by actor, action (or `prefix.`) and entity (kind or subject). */
  async projectAudit(em: EntityManager, project: Project, q: ProjectAuditQuery): Promise<ProjectAuditPage> {
    const where: Record<string, unknown> = { project };
    if (q.actor) where.actor = q.actor;
    if (q.action) where.action = q.action.endsWith('.') ? { $like: `${likeLiteral(q.action)}%` } : q.action;
    if (q.entity) where.subject = q.entity.includes(':') ? q.entity : { $like: `${likeLiteral(q.entity)}:%` };
    const [events, total] = await em.findAndCount(AuditEvent, where, {
      orderBy: { createdAt: 'desc', id: 'desc' },
      limit: q.pageSize,
      offset: (q.page - 1) * q.pageSize,
    });
    return { items: events.map((e) => ({ ...toTrailEntry(e), subject: e.subject })), total, page: q.page, pageSize: q.pageSize };
  }
}

function assertDraft(mask: MaskRevision, verb: string): void {
  if (mask.state !== 'draft') {
    throw new ConflictError(`Revision ${mask.revision} is ${mask.state.replace('_', ' ')} and can no longer be ${verb}; copy it to a new draft instead.`);
  }
}

/** What an edit can change, as the audit log records it: checks in schema order, the target by key. */
function editableFields(mask: MaskRevision): Record<string, unknown> {
  return {
    checks: mask.checks.map((c) => {
      const parsed = MaskCheck.safeParse(c);
      return parsed.success ? parsed.data : c;
    }),
    note: mask.note,
    target: mask.target?.key ?? null,
    settings: normalizedSettings(mask.settings),
  };
}
