import { WorkspaceAuditPage } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { workspaceAuditParams, type WorkspaceAuditSearch } from '../utils/workspace-audit-search';

export function getWorkspaceAuditQueryOptions(search: WorkspaceAuditSearch) {
  return queryOptions({
    queryKey: ['admin', 'audit', search] as const,
    queryFn: ({ signal }) => apiRequest(`/api/admin/audit?${workspaceAuditParams(search, true).toString()}`, { schema: WorkspaceAuditPage, signal }),
    placeholderData: keepPreviousData,
  });
}

export function useWorkspaceAudit(search: WorkspaceAuditSearch) {
  return useQuery(getWorkspaceAuditQueryOptions(search));
}
