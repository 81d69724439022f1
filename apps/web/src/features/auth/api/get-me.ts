import { CurrentUser } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

export function getMe(signal?: AbortSignal): Promise<CurrentUser> {
  return apiRequest('/api/me', { schema: CurrentUser, signal });
}

export const meQueryKey = ['me'] as const;

export function getMeQueryOptions() {
  return queryOptions({
    queryKey: meQueryKey,
    queryFn: ({ signal }) => getMe(signal),
    // Roles change rarely; a reload or a new sign-in fetches them again.
    staleTime: 5 * 60_000,
  });
}

export function useMe() {
  return useQuery(getMeQueryOptions());
}
