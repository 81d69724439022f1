import { WaiverList, type WaiverDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { approvalsKeyRoot, projectPath } from './keys';

/** Approved waivers, newest first: the ones in force and any past their date that the sweep has not expired yet. */
export async function getApprovedWaivers(projectKey: string, signal?: AbortSignal): Promise<WaiverDto[]> {
  const { items } = await apiRequest(`${projectPath(projectKey)}/waivers?state=approved`, { schema: WaiverList, signal });
  return items;
}

export function getApprovedWaiversQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: [...approvalsKeyRoot(projectKey), 'waivers', 'approved'] as const,
    queryFn: ({ signal }) => getApprovedWaivers(projectKey, signal),
  });
}

export function useApprovedWaivers(projectKey: string) {
  return useQuery(getApprovedWaiversQueryOptions(projectKey));
}
