import { CreatedApiToken, type CreateApiTokenRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { tokensQueryKey } from './get-tokens';

export function createToken(projectKey: string, body: CreateApiTokenRequest): Promise<CreatedApiToken> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/tokens`, { method: 'POST', body, schema: CreatedApiToken });
}

/**
 * The secret lives only in this mutation's result: it is never written to the query cache,
 * and calling `reset()` when the dialog closes drops it for good.
 */
export function useCreateToken(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateApiTokenRequest) => createToken(projectKey, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: tokensQueryKey(projectKey) }),
  });
}
