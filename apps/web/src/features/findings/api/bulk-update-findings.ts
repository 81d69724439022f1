import { FindingRow, type BulkUpdateFindingsRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';
import { findingsKeyRoot } from './keys';

const BulkResult = z.object({ items: z.array(FindingRow) });

export async function bulkUpdateFindings(projectKey: string, body: BulkUpdateFindingsRequest): Promise<FindingRow[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/findings/bulk`, {
    method: 'POST',
    body,
    schema: BulkResult,
  });
  return items;
}

export function useBulkUpdateFindings(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: BulkUpdateFindingsRequest) => bulkUpdateFindings(projectKey, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: findingsKeyRoot(projectKey) }),
  });
}
