import { WaiverList, type WaiverDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { approvalsKeyRoot, projectPath } from './keys';

export async function getRequestedWaivers(projectKey: string, signal?: AbortSignal): Promise<WaiverDto[]> {
  const { items } = await apiRequest(`${projectPath(projectKey)}/waivers?state=requested`, { schema: WaiverList, signal });
  return items;
}

export function getRequestedWaiversQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: [...approvalsKeyRoot(projectKey), 'waivers'] as const,
    queryFn: ({ signal }) => getRequestedWaivers(projectKey, signal),
  });
}

export function useRequestedWaivers(projectKey: string) {
  return useQuery(getRequestedWaiversQueryOptions(projectKey));
}
