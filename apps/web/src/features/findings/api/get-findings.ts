import { FindingsPage } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { findingsApiParams, type FindingsSearch } from '../utils/findings-search';
import { findingsKeyRoot } from './keys';

export type FindingsRequest = FindingsSearch & { captureId?: string };

export function getFindings(projectKey: string, request: FindingsRequest, signal?: AbortSignal): Promise<FindingsPage> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/findings?${findingsApiParams(request).toString()}`, {
    schema: FindingsPage,
    signal,
  });
}

export function getFindingsQueryOptions(projectKey: string, request: FindingsRequest) {
  return queryOptions({
    queryKey: [...findingsKeyRoot(projectKey), 'list', request] as const,
    queryFn: ({ signal }) => getFindings(projectKey, request, signal),
    placeholderData: keepPreviousData,
    staleTime: 15_000,
  });
}

export function useFindings(projectKey: string, request: FindingsRequest) {
  return useQuery(getFindingsQueryOptions(projectKey, request));
}
