import { MaskRevisionDto, type CopyMaskRevisionRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { masksKeyRoot, revisionPath } from './keys';

export function submitRevision(projectKey: string, caseKey: string, revision: number): Promise<MaskRevisionDto> {
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/submit`, { method: 'POST', schema: MaskRevisionDto });
}

export function copyRevision(projectKey: string, caseKey: string, revision: number, body: CopyMaskRevisionRequest): Promise<MaskRevisionDto> {
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/copy`, { method: 'POST', body, schema: MaskRevisionDto });
}

/** Draft → in review; QA managers then see it in their approvals queue. */
export function useSubmitRevision(projectKey: string, caseKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (revision: number) => submitRevision(projectKey, caseKey, revision),
    // Approvals and audit read the same revisions; refresh every project query that could show them.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['projects', projectKey] }),
  });
}

/** Any revision → a new draft with the same checks. */
export function useCopyRevision(projectKey: string, caseKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ revision, body }: { revision: number; body: CopyMaskRevisionRequest }) => copyRevision(projectKey, caseKey, revision, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: masksKeyRoot(projectKey, caseKey) }),
  });
}
