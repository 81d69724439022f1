import { BuildsPage } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { buildsSearchParams, type BuildsSearch } from '../utils/builds-search';

/** How often a page with unfinished builds asks again, so analysis progress shows. */
export const BUILD_POLL_MS = 3000;

export function buildsQueryKeyRoot(projectKey: string) {
  return ['projects', projectKey, 'builds'] as const;
}

export function getBuilds(projectKey: string, search: BuildsSearch, signal?: AbortSignal): Promise<BuildsPage> {
  const query = buildsSearchParams(search, true).toString();
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/builds?${query}`, { schema: BuildsPage, signal });
}

export function getBuildsQueryOptions(projectKey: string, search: BuildsSearch) {
  return queryOptions({
    queryKey: [...buildsQueryKeyRoot(projectKey), 'list', search] as const,
    queryFn: ({ signal }) => getBuilds(projectKey, search, signal),
    // Paging and filtering keep the old rows on screen until the new ones arrive.
    placeholderData: keepPreviousData,
    staleTime: 10_000,
    refetchInterval: (query) =>
      query.state.data?.items.some((build) => build.status === 'pending' || build.status === 'running')
        ? BUILD_POLL_MS
        : false,
  });
}

export function useBuilds(projectKey: string, search: BuildsSearch) {
  return useQuery(getBuildsQueryOptions(projectKey, search));
}
