import { Button } from '@/components/button';
import { InlineError } from '@/components/inline-error';
import { useProjectAbilities } from '@/lib/authorization';
import { useReevaluate } from '../api/reevaluate';

/**
 * For an approved revision: judge the open builds (the newest of each branch) again under it.
 * Their earlier verdicts stay; each new verdict links to the one it replaces.
 */
export function ReevaluateButton({ projectKey, caseKey, revision }: { projectKey: string; caseKey: string; revision: number }) {
  const { canApprove } = useProjectAbilities(projectKey);
  const run = useReevaluate(projectKey, caseKey);
  if (!canApprove) return null;
  return (
    <div className="flex flex-col items-end gap-1">
      <Button variant="secondary" busy={run.isPending} onClick={() => run.mutate(revision)}>
        Re-evaluate open builds
      </Button>
      {run.data ? (
        <p role="status" className="text-xs text-ink-600">
          {run.data.queued === 0
            ? `Every capture of the ${run.data.builds} open build${run.data.builds === 1 ? '' : 's'} is already judged under revision ${revision}.`
            : `${run.data.queued} capture${run.data.queued === 1 ? '' : 's'} of ${run.data.builds} open build${run.data.builds === 1 ? '' : 's'} queued for a new verdict.`}
        </p>
      ) : null}
      {run.error ? <InlineError error={run.error} /> : null}
    </div>
  );
}
