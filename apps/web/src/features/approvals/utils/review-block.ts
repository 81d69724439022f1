import type { MaskRevisionDto } from '@earmark/contracts';

/**
 * Why the signed-in user may not approve or reject this revision, or null when they may.
 * Mirrors the API's four-eyes rule (packages/domain/src/rules/four-eyes.ts): nobody who wrote
 * or edited a revision decides it, whatever their role. The API refuses anyway; this only
 * lets the buttons say so before anyone clicks.
 */
export function revisionReviewBlock(revision: Pick<MaskRevisionDto, 'author' | 'contributors'>, myEmail: string | null): string | null {
  if (myEmail === null) return null;
  if (revision.author === myEmail) return 'You drafted this revision; another QA manager must approve it';
  if (revision.contributors.includes(myEmail)) return 'You edited this revision; someone else must review it.';
  return null;
}
