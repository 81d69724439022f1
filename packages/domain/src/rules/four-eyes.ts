import { ForbiddenError } from '../errors.js';

/**
 * THE four-eyes rule of the review workflows, in one place (pure: no database, no HTTP):
 *
 * - a draft mask revision is changed and submitted only by its author; anyone else —
 *   QA managers and admins included — copies it to a draft of their own;
 * - a revision is approved or rejected only by someone who neither wrote nor edited it
 *   (its contributors: the author and every editor, recorded on the revision);
 * - a waiver is approved or rejected only by someone who neither requested nor edited it.
 *
 * Role permissions (who may draft, who may decide at all) are the API's permission matrix;
 * these rules come on top of them and no role is exempt.
 */

/** Who someone is, as far as the rule cares. */
export interface Person {
  id: string;
  email: string;
}

/** A draft mask revision: its number and who wrote it. */
export interface DraftUnderEdit {
  revision: number;
  author: Person;
}

/** Work awaiting a decision: who asked for it and everyone whose hand is in it. */
export interface WorkUnderReview {
  kind: 'mask revision' | 'waiver';
  /** How the message names it: `revision 4`, `this request`. */
  label: string;
  author: Person;
  /** User ids of everyone who wrote or edited it; the author counts even when missing here. */
  contributors: readonly string[];
}

/** The contributors with the author first, each once. */
export function contributorsOf(work: { author: Pick<Person, 'id'>; contributors: readonly string[] }): string[] {
  return [...new Set([work.author.id, ...work.contributors])];
}

/** The contributor list after `editor` changed the work (appended once, order kept). */
export function withContributor(contributors: readonly string[], editor: Pick<Person, 'id'>): string[] {
  return contributors.includes(editor.id) ? [...contributors] : [...contributors, editor.id];
}

/** @throws ForbiddenError unless `actor` wrote the draft. */
export function assertMayEditDraft(draft: DraftUnderEdit, actor: Person): void {
  if (draft.author.id !== actor.id) {
    throw new ForbiddenError(
      `Only the author of revision ${draft.revision} (${draft.author.email}) may change it; copy the revision to a draft of your own to propose other limits.`,
    );
  }
}

/** @throws ForbiddenError unless `actor` wrote the draft: submitting says "this is ready", which only its author can say. */
export function assertMaySubmit(draft: DraftUnderEdit, actor: Person): void {
  if (draft.author.id !== actor.id) {
    throw new ForbiddenError(
      `Only the author of revision ${draft.revision} (${draft.author.email}) may submit it for review; copy the revision to a draft of your own to submit your version.`,
    );
  }
}

/** @throws ForbiddenError when `decider` wrote, requested or edited the work. */
export function assertMayDecide(work: WorkUnderReview, decider: Person, verb: 'approved' | 'rejected'): void {
  if (!contributorsOf(work).includes(decider.id)) return;
  const wrote = work.kind === 'waiver' ? 'requested' : 'wrote';
  const part = decider.id === work.author.id ? `${wrote} ${work.label}` : `edited ${work.label}`;
  const who = work.kind === 'waiver' ? 'neither requested nor edited it' : 'neither wrote nor edited it';
  const next = work.kind === 'waiver' ? 'Someone else must decide it.' : 'Someone else must review it.';
  throw new ForbiddenError(`A ${work.kind} must be ${verb} by someone who ${who}: ${decider.email} ${part}. ${next}`);
}

/** The four-eyes view of a mask revision. */
export function maskUnderReview(mask: { revision: number; author: Person; contributors: readonly string[] }): WorkUnderReview {
  return { kind: 'mask revision', label: `revision ${mask.revision}`, author: mask.author, contributors: mask.contributors };
}

/**
 * The four-eyes view of a waiver. Waiver requests cannot be edited today, so the requester
 * is the only contributor; `editors` is where edits would be counted if they ever exist.
 */
export function waiverUnderReview(waiver: { requestedBy: Person }, editors: readonly string[] = []): WorkUnderReview {
  return { kind: 'waiver', label: 'it', author: waiver.requestedBy, contributors: editors };
}
