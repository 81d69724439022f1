import { MaskRevisionDto, WaiverDto, type MaskDecisionRequest, type MaskRejectRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { projectPath, revisionPath } from './keys';

export type Decision = { verdict: 'approve'; body: MaskDecisionRequest } | { verdict: 'reject'; body: MaskRejectRequest };

export function decideRevision(projectKey: string, caseKey: string, revision: number, decision: Decision): Promise<MaskRevisionDto> {
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/${decision.verdict}`, { method: 'POST', body: decision.body, schema: MaskRevisionDto });
}

export function decideWaiver(projectKey: string, waiverId: string, decision: Decision): Promise<WaiverDto> {
  return apiRequest(`${projectPath(projectKey)}/waivers/${encodeURIComponent(waiverId)}/${decision.verdict}`, { method: 'POST', body: decision.body, schema: WaiverDto });
}

export type DecisionTarget = { kind: 'revision'; caseKey: string; revision: number } | { kind: 'waiver'; id: string };

/** Approves or rejects; the queue, the test case's masks and the audit log all change, so the project's queries refresh. */
export function useDecide(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ target, decision }: { target: DecisionTarget; decision: Decision }): Promise<MaskRevisionDto | WaiverDto> =>
      target.kind === 'revision' ? decideRevision(projectKey, target.caseKey, target.revision, decision) : decideWaiver(projectKey, target.id, decision),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['projects', projectKey] }),
  });
}
