import { MaskRevisionDto, type CreateMaskRevisionRequest, type UpdateMaskDraftRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { casePath, masksKeyRoot, revisionPath } from './keys';

export function createDraft(projectKey: string, caseKey: string, body: CreateMaskRevisionRequest): Promise<MaskRevisionDto> {
  return apiRequest(`${casePath(projectKey, caseKey)}/masks`, { method: 'POST', body, schema: MaskRevisionDto });
}

export function updateDraft(projectKey: string, caseKey: string, revision: number, body: UpdateMaskDraftRequest): Promise<MaskRevisionDto> {
  return apiRequest(revisionPath(projectKey, caseKey, revision), { method: 'PATCH', body, schema: MaskRevisionDto });
}

export type SaveDraftInput = { revision: number | null; checks: unknown[]; note: string; target: string | null; settings?: UpdateMaskDraftRequest['settings'] };

/** Saves the editor: a new draft (POST) or changes to an existing one (PATCH). */
export function useSaveDraft(projectKey: string, caseKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ revision, checks, note, target, settings }: SaveDraftInput) =>
      revision === null
        ? createDraft(projectKey, caseKey, { checks, note, target })
        : updateDraft(projectKey, caseKey, revision, { checks, note, target, ...(settings ? { settings } : {}) }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: masksKeyRoot(projectKey, caseKey) }),
  });
}
