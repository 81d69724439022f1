import { TargetDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const TargetList = z.object({ items: z.array(TargetDto) });

export async function getTargets(projectKey: string, signal?: AbortSignal): Promise<TargetDto[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/targets`, { schema: TargetList, signal });
  return items;
}

/** The same key the builds feature uses for the same list, so the cache entry is shared. */
export function getTargetsQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'targets'] as const,
    queryFn: ({ signal }) => getTargets(projectKey, signal),
    staleTime: 5 * 60_000,
  });
}

export function useTargets(projectKey: string) {
  return useQuery(getTargetsQueryOptions(projectKey));
}
