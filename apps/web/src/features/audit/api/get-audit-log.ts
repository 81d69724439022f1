import { ProjectAuditPage } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { auditSearchParams, type AuditSearch } from '../utils/audit-search';

export function getAuditLog(projectKey: string, search: AuditSearch, signal?: AbortSignal): Promise<ProjectAuditPage> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/audit?${auditSearchParams(search, true).toString()}`, { schema: ProjectAuditPage, signal });
}

export function getAuditLogQueryOptions(projectKey: string, search: AuditSearch) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'audit', search] as const,
    queryFn: ({ signal }) => getAuditLog(projectKey, search, signal),
    placeholderData: keepPreviousData,
  });
}

export function useAuditLog(projectKey: string, search: AuditSearch) {
  return useQuery(getAuditLogQueryOptions(projectKey, search));
}
