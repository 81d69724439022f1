import { ProjectOverview } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

export function getOverview(key: string, signal?: AbortSignal): Promise<ProjectOverview> {
  return apiRequest(`/api/projects/${encodeURIComponent(key)}/overview`, { schema: ProjectOverview, signal });
}

/** Under ['projects', key] so refreshing a project refreshes its overview and the menu's counts. */
export const overviewQueryKey = (key: string) => ['projects', key, 'overview'] as const;

export function getOverviewQueryOptions(key: string) {
  return queryOptions({
    queryKey: overviewQueryKey(key),
    queryFn: ({ signal }) => getOverview(key, signal),
    // The menu's counts read this on every project page: fresh enough without a request per click.
    staleTime: 15_000,
  });
}

export function useOverview(key: string, enabled = true) {
  return useQuery({ ...getOverviewQueryOptions(key), enabled: enabled && key !== '' });
}
