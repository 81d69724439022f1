import { BuildTrend } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { BUILD_POLL_MS, buildsQueryKeyRoot } from './get-builds';

export function getBuildTrend(projectKey: string, signal?: AbortSignal): Promise<BuildTrend> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/builds/trend`, { schema: BuildTrend, signal });
}

export function getBuildTrendQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: [...buildsQueryKeyRoot(projectKey), 'trend'] as const,
    queryFn: ({ signal }) => getBuildTrend(projectKey, signal),
    staleTime: 10_000,
    refetchInterval: (query) =>
      query.state.data?.points.some((point) => point.status === 'pending' || point.status === 'running')
        ? BUILD_POLL_MS * 2
        : false,
  });
}

export function useBuildTrend(projectKey: string) {
  return useQuery(getBuildTrendQueryOptions(projectKey));
}
