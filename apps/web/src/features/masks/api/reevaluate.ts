import { ReevaluateResponse, type ReevaluateRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { revisionPath } from './keys';

export function reevaluate(projectKey: string, caseKey: string, revision: number, body: ReevaluateRequest): Promise<ReevaluateResponse> {
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/reevaluate`, { method: 'POST', body, schema: ReevaluateResponse });
}

/** Judges the newest builds of every branch again under an approved revision. */
export function useReevaluate(projectKey: string, caseKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (revision: number) => reevaluate(projectKey, caseKey, revision, { scope: 'open-builds' }),
    // Build pages and tables show the new verdicts as the worker writes them.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['projects', projectKey] }),
  });
}
