import type { FindingRow } from '@earmark/contracts';
import { Button } from '@/components/button';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { ErrorState } from '@/components/error-state';
import { InlineError } from '@/components/inline-error';
import { Skeleton } from '@/components/skeleton';
import { useCurrentUser, useProjectAbilities } from '@/lib/authorization';
import { describeMargin } from '@/lib/format-measure';
import { paths } from '@/lib/paths';
import { useFindings } from '../api/get-findings';
import { useMembers } from '../api/get-members';
import { useUpdateFinding } from '../api/update-finding';
import { RequestWaiverDialog } from './request-waiver-dialog';
import { CommentsPanel } from './comments-panel';
import { CommentsButton } from './findings-table';
import { AssignMenu, AssigneeName, FindingStateLabel, StateMenu, assigneeOptions } from './triage-controls';

/**
 * The findings of one capture with assign, state and comments, for the capture page
 * (composed there at the route level). Viewers see the same list without the controls.
 */
export function FindingsTriagePanel({ projectKey, captureId }: { projectKey: string; captureId: string }) {
  const { canTriage } = useProjectAbilities(projectKey);
  const me = useCurrentUser();
  const findings = useFindings(projectKey, { page: 1, pageSize: 200, state: 'all', captureId });
  const members = useMembers(projectKey);
  const update = useUpdateFinding(projectKey);
  const [commentsFor, setCommentsFor] = useState<string | null>(null);
  const [waiverFor, setWaiverFor] = useState<FindingRow | null>(null);
  const assignees = useMemo(() => assigneeOptions(members.data ?? [], me?.id), [members.data, me?.id]);
  const items: FindingRow[] = findings.data?.items ?? [];
  const openFinding = items.find((finding) => finding.id === commentsFor) ?? null;
  const pendingId = update.isPending ? update.variables.id : null;

  return (
    <section aria-labelledby="triage-heading" className="rounded-lg border border-line bg-paper-raised">
      <header className="flex items-baseline justify-between gap-3 border-b border-line px-4 py-3">
        <h2 id="triage-heading" className="text-sm font-semibold text-ink-950">
          Findings
        </h2>
        <Link to={paths.findings(projectKey)} className="text-xs text-ink-600 underline-offset-4 hover:underline">
          Open the findings queue
        </Link>
      </header>
      <div className="px-4 py-3">
        {findings.isPending ? (
          <div className="space-y-2" aria-busy="true">
            <Skeleton className="h-12" />
            <Skeleton className="h-12" />
          </div>
        ) : findings.isError ? (
          <ErrorState error={findings.error} onRetry={() => void findings.refetch()} />
        ) : items.length === 0 ? (
          <p className="text-sm text-ink-500">No findings for this capture: every check passed, or none needs a human.</p>
        ) : (
          <ul className="divide-y divide-line">
            {items.map((finding) => (
              <li key={finding.id} data-finding-id={finding.id} className="space-y-2 py-3 first:pt-0 last:pb-0">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <p className="text-sm font-medium text-ink-950">{finding.title}</p>
                  <span className="font-mono text-[12px] tabular-nums text-ink-700">{describeMargin(finding)}</span>
                </div>
                <div className="flex flex-wrap items-center gap-2">
                  {canTriage ? (
                    <StateMenu
                      finding={finding}
                      busy={pendingId === finding.id}
                      onChange={(state) => update.mutate({ id: finding.id, body: { state } })}
                    />
                  ) : (
                    <FindingStateLabel state={finding.state} />
                  )}
                  <span className="mx-1 h-4 w-px bg-line" aria-hidden="true" />
                  <AssigneeName finding={finding} />
                  {canTriage ? (
                    <AssignMenu
                      finding={finding}
                      options={assignees}
                      busy={pendingId === finding.id}
                      onAssign={(assigneeId) => update.mutate({ id: finding.id, body: { assigneeId } })}
                    />
                  ) : null}
                  <span className="ml-auto flex items-center gap-2">
                    {canTriage && (finding.state === 'open' || finding.state === 'investigating') ? (
                      <Button variant="ghost" className="h-7 px-2 text-xs" onClick={() => setWaiverFor(finding)}>
                        Request waiver
                      </Button>
                    ) : null}
                    <CommentsButton finding={finding} onOpen={() => setCommentsFor(finding.id)} />
                  </span>
                </div>
              </li>
            ))}
          </ul>
        )}
        {update.error ? <InlineError error={update.error} className="mt-3" /> : null}
      </div>
      <CommentsPanel projectKey={projectKey} finding={openFinding} canComment={canTriage} onClose={() => setCommentsFor(null)} />
      <RequestWaiverDialog projectKey={projectKey} finding={waiverFor} onClose={() => setWaiverFor(null)} />
    </section>
  );
}
