import { MemberRow } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const MemberList = z.object({ items: z.array(MemberRow) });

export async function getMembers(projectKey: string, signal?: AbortSignal): Promise<MemberRow[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/members`, { schema: MemberList, signal });
  return items;
}

/** The same key the findings feature uses for the same list, so the cache entry is shared. */
export function getMembersQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'members'] as const,
    queryFn: ({ signal }) => getMembers(projectKey, signal),
    staleTime: 5 * 60_000,
  });
}

export function useMembers(projectKey: string) {
  return useQuery(getMembersQueryOptions(projectKey));
}
