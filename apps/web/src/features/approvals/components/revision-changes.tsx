import { describeCheckDiff, type MaskRevisionDto } from '@earmark/contracts';
import { ErrorState } from '@/components/error-state';
import { Skeleton } from '@/components/skeleton';
import { ApiError } from '@/lib/api-error';
import { useMaskDiff } from '@/features/masks/api/get-mask-diff';
import { envelopePairs, type EnvelopePair } from '../utils/limits-overlay';
import { LimitsOverlay } from './limits-overlay';

const show = (value: unknown) => (value === undefined || value === null ? 'default' : typeof value === 'string' ? value : JSON.stringify(value));

/** The first revision has nothing before it: its envelopes are drawn alone. */
function firstRevisionPairs(revision: MaskRevisionDto): EnvelopePair[] {
  return envelopePairs({
    checks: revision.checks.map((check) => ({ id: check.id, kind: check.kind, status: 'added', changes: [], before: null, after: check as Record<string, unknown> })),
  });
}

/**
 * What a revision in review changes, in words ("upper limit at 8 kHz: +1.50 → +1.00 dB"),
 * beside its old and new limits drawn over a capture the reviewer picks.
 */
export function RevisionChanges({ projectKey, revision }: { projectKey: string; revision: MaskRevisionDto }) {
  const diff = useMaskDiff(projectKey, revision.testCase, revision.revision, null);
  const first = diff.error instanceof ApiError && diff.error.isNotFound;

  if (diff.isPending) return <Skeleton className="h-40 rounded-md" />;
  if (diff.isError && !first) return <ErrorState error={diff.error} onRetry={() => void diff.refetch()} />;

  const sentences = diff.data
    ? diff.data.checks.flatMap((check) => describeCheckDiff(check).map((text) => ({ id: check.id, text })))
    : [];
  const settings = diff.data?.settingsChanges ?? [];
  return (
    <div className="min-w-0 space-y-4">
      <section aria-label={`What revision ${revision.revision} changes`} className="space-y-1.5">
        <h3 className="text-sm font-semibold text-ink-950">
          What changes
          {diff.data ? <span className="font-normal text-ink-600"> against revision {diff.data.base.revision}</span> : null}
        </h3>
        {first ? (
          <p className="text-sm text-ink-700">The first revision of this test case: there is nothing earlier to compare with.</p>
        ) : sentences.length === 0 && settings.length === 0 ? (
          <p className="text-sm text-ink-700">The checks are the same as in revision {diff.data?.base.revision}{diff.data?.noteChanged ? '; only the note changed' : ''}.</p>
        ) : (
          <ul aria-label="Changes in words" className="space-y-1 text-sm text-ink-900">
            {sentences.map(({ id, text }, i) => (
              <li key={`${id}-${i}`} className="flex min-w-0 flex-wrap gap-x-2">
                <span className="font-mono text-[13px] text-ink-600">{id}</span>
                <span data-change-text="" className="min-w-0 break-words">
                  {text}
                </span>
              </li>
            ))}
            {settings.map((change) => (
              <li key={change.path} className="flex min-w-0 flex-wrap gap-x-2">
                <span className="font-mono text-[13px] text-ink-600">settings</span>
                <span data-change-text="" className="min-w-0 break-all">
                  {change.path}: {show(change.before)} → {show(change.after)}
                </span>
              </li>
            ))}
          </ul>
        )}
        {diff.data?.targetChanged ? <p className="text-xs text-ink-600">The target it applies to changes too.</p> : null}
      </section>
      <LimitsOverlay
        projectKey={projectKey}
        caseKey={revision.testCase}
        pairs={diff.data ? envelopePairs(diff.data) : firstRevisionPairs(revision)}
        baseRevision={diff.data?.base.revision ?? null}
        headRevision={revision.revision}
      />
    </div>
  );
}
