import type { QueryClient } from '@tanstack/react-query';
import { useParams, useSearchParams, type ShouldRevalidateFunctionArgs } from 'react-router';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { Pagination } from '@/components/pagination';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { getAuditLogQueryOptions, useAuditLog } from '@/features/audit/api/get-audit-log';
import { useMembers } from '@/features/audit/api/get-members';
import { AuditFilters, type AuditFilterPatch } from '@/features/audit/components/audit-filters';
import { AuditTable, AuditTableSkeleton } from '@/features/audit/components/audit-table';
import { auditSearchParams, parseAuditSearch, type AuditSearch } from '@/features/audit/utils/audit-search';
import { abilitiesIn, useProjectAbilities } from '@/lib/authorization';
import { requireSession } from '../require-session';

export const auditLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params, request }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    const me = await queryClient.ensureQueryData(getMeQueryOptions());
    if (abilitiesIn(me, params.projectKey).canApprove) {
      await queryClient.ensureQueryData(getAuditLogQueryOptions(params.projectKey, parseAuditSearch(new URL(request.url).searchParams)));
    }
    return null;
  });

/** Filtering and paging only change the URL; the query follows it and keeps the old rows meanwhile. */
export function auditShouldRevalidate({ currentUrl, nextUrl, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return currentUrl.pathname === nextUrl.pathname ? false : defaultShouldRevalidate;
}

function AuditContent({ projectKey }: { projectKey: string }) {
  const [params, setParams] = useSearchParams();
  const search = parseAuditSearch(params);
  const log = useAuditLog(projectKey, search);
  const members = useMembers(projectKey);
  const go = (next: AuditSearch) => setParams(auditSearchParams(next));
  const onFilter = (patch: AuditFilterPatch) => go({ ...search, ...patch, page: 1 });

  return (
    <div className="space-y-4">
      <AuditFilters key={search.action ?? ''} search={search} members={members.data ?? []} onChange={onFilter} />
      {log.isPending ? (
        <AuditTableSkeleton />
      ) : log.isError ? (
        <ErrorState error={log.error} onRetry={() => void log.refetch()} />
      ) : log.data.items.length === 0 ? (
        <EmptyState title={search.actor || search.action || search.entity ? 'Nothing matches these filters' : 'Nothing recorded yet'}>
          {search.actor || search.action || search.entity
            ? 'Clear a filter to see more of the log.'
            : 'Mask revisions, waivers and test-case changes are recorded here as people make them.'}
        </EmptyState>
      ) : (
        <div className={log.isPlaceholderData ? 'space-y-3 opacity-60 transition-opacity' : 'space-y-3'}>
          <AuditTable rows={log.data.items} />
          <Pagination
            label="Audit log pages"
            page={log.data.page}
            pageSize={log.data.pageSize}
            total={log.data.total}
            pageSizes={[25, 50, 100, 200]}
            onPageChange={(page) => go({ ...search, page })}
            onPageSizeChange={(pageSize) => go({ ...search, pageSize, page: 1 })}
          />
        </div>
      )}
    </div>
  );
}

export function AuditRoute() {
  const { projectKey = '' } = useParams();
  const { canApprove } = useProjectAbilities(projectKey);
  return (
    <div className="space-y-5">
      <title>{`Audit log · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Audit log"
        description="Every decision and change in this project: who, what, when, and the comment given."
      />
      {canApprove ? (
        <AuditContent projectKey={projectKey} />
      ) : (
        <EmptyState title="Only QA managers and administrators read the audit log">Ask one of them if you need to trace a change.</EmptyState>
      )}
    </div>
  );
}
