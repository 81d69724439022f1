import { ApiTokenRow } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { tokensQueryKey } from './get-tokens';

export function revokeToken(projectKey: string, tokenId: string): Promise<ApiTokenRow> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/tokens/${encodeURIComponent(tokenId)}`, {
    method: 'DELETE',
    schema: ApiTokenRow,
  });
}

export function useRevokeToken(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (tokenId: string) => revokeToken(projectKey, tokenId),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: tokensQueryKey(projectKey) }),
  });
}
