import { ApiTokenRow } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const TokenList = z.object({ items: z.array(ApiTokenRow) });

export async function getTokens(projectKey: string, signal?: AbortSignal): Promise<ApiTokenRow[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/tokens`, { schema: TokenList, signal });
  return items;
}

export function tokensQueryKey(projectKey: string) {
  return ['projects', projectKey, 'tokens'] as const;
}

export function getTokensQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: tokensQueryKey(projectKey),
    queryFn: ({ signal }) => getTokens(projectKey, signal),
  });
}

export function useTokens(projectKey: string) {
  return useQuery(getTokensQueryOptions(projectKey));
}
