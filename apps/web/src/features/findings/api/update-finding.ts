import { FindingRow, type UpdateFindingRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { findingsKeyRoot } from './keys';

export function updateFinding(projectKey: string, id: string, body: UpdateFindingRequest): Promise<FindingRow> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/findings/${encodeURIComponent(id)}`, {
    method: 'PATCH',
    body,
    schema: FindingRow,
  });
}

export function useUpdateFinding(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, body }: { id: string; body: UpdateFindingRequest }) => updateFinding(projectKey, id, body),
    // Lists filtered by state or assignee may gain or lose the row, so refetch rather than patch.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: findingsKeyRoot(projectKey) }),
  });
}
