import { TargetDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const TargetList = z.object({ items: z.array(TargetDto) });

export async function getTargets(projectKey: string, signal?: AbortSignal): Promise<TargetDto[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/targets`, { schema: TargetList, signal });
  return items;
}

export function getTargetsQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'targets'] as const,
    queryFn: ({ signal }) => getTargets(projectKey, signal),
    // Targets are configuration: they change about as often as a board revision does.
    staleTime: 5 * 60_000,
  });
}

export function useTargets(projectKey: string) {
  return useQuery(getTargetsQueryOptions(projectKey));
}
