import type { FindingRow } from '@earmark/contracts';
import { useCallback, useMemo, useState } from 'react';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { Pagination } from '@/components/pagination';
import { useOverview } from '@/features/projects/api/get-overview';
import { useProjectAbilities, useCurrentUser } from '@/lib/authorization';
import { useFindings } from '../api/get-findings';
import { useMembers } from '../api/get-members';
import { useTestCaseOptions } from '../api/get-test-cases';
import type { FindingsSearch } from '../utils/findings-search';
import { CommentsPanel } from './comments-panel';
import { FindingsFilters, type FindingsFilterPatch } from './findings-filters';
import { FindingsTable, FindingsTableSkeleton } from './findings-table';
import { assigneeOptions } from './triage-controls';

/**
 * The whole findings page below its header: filters, the table, paging and the comments
 * panel. The URL state (search) and the targets list come from the route.
 */
export function FindingsQueue({
  projectKey,
  search,
  targets,
  onSearchChange,
}: {
  projectKey: string;
  search: FindingsSearch;
  targets: Array<{ key: string; name: string }>;
  onSearchChange: (next: FindingsSearch) => void;
}) {
  const { canTriage } = useProjectAbilities(projectKey);
  const me = useCurrentUser();
  const findings = useFindings(projectKey, search);
  const members = useMembers(projectKey);
  const testCases = useTestCaseOptions(projectKey);
  // The branch filter offers the branches the overview lists (main first, then the most recent).
  const overview = useOverview(projectKey);
  const branches = useMemo(() => overview.data?.branches.map((b) => b.branch) ?? [], [overview.data]);
  const [commentsFor, setCommentsFor] = useState<string | null>(null);
  const assignees = useMemo(() => assigneeOptions(members.data ?? [], me?.id), [members.data, me?.id]);
  const openComments = useCallback((finding: FindingRow) => setCommentsFor(finding.id), []);
  // Read the finding from the latest page, so its title and count follow refetches.
  const openFinding = findings.data?.items.find((finding) => finding.id === commentsFor) ?? null;

  const patch = (change: FindingsFilterPatch) => onSearchChange({ ...search, ...change, page: 1 });

  return (
    <div className="space-y-4">
      <FindingsFilters
        search={search}
        members={members.data ?? []}
        testCases={testCases.data ?? []}
        targets={targets}
        branches={branches}
        onChange={patch}
      />
      {findings.isPending ? (
        <FindingsTableSkeleton />
      ) : findings.isError ? (
        <ErrorState error={findings.error} onRetry={() => void findings.refetch()} />
      ) : findings.data.items.length === 0 ? (
        <EmptyState title={search.state === 'active' && !search.assignee && !search.testCase && !search.target ? 'Nothing needs a human' : 'No findings match'}>
          {search.state === 'active'
            ? 'No open or investigating findings with these filters. Failing checks of new builds show up here.'
            : 'Try another state, assignee, test case or target.'}
        </EmptyState>
      ) : (
        <>
          <FindingsTable
            projectKey={projectKey}
            findings={findings.data.items}
            canTriage={canTriage}
            assignees={assignees}
            onOpenComments={openComments}
            busy={findings.isPlaceholderData}
          />
          <Pagination
            label="Findings pages"
            page={findings.data.page}
            pageSize={findings.data.pageSize}
            total={findings.data.total}
            pageSizes={[25, 50, 100, 200]}
            onPageChange={(page) => onSearchChange({ ...search, page })}
            onPageSizeChange={(pageSize) => onSearchChange({ ...search, pageSize, page: 1 })}
          />
        </>
      )}
      <CommentsPanel projectKey={projectKey} finding={openFinding} canComment={canTriage} onClose={() => setCommentsFor(null)} />
    </div>
  );
}
