import { ReanalyseResponse } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { capturePath, getCaptureQueryOptions } from './get-capture';

/** Queues the capture for a new analysis (engineers and up; the API audits it). */
export function reanalyseCapture(projectKey: string, captureId: string): Promise<ReanalyseResponse> {
  return apiRequest(`${capturePath(projectKey, captureId)}/reanalyse`, { method: 'POST', schema: ReanalyseResponse });
}

/** After the request the capture reads `queued` again, so its page polls until the new verdict. */
export function useReanalyseCapture(projectKey: string, captureId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => reanalyseCapture(projectKey, captureId),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: getCaptureQueryOptions(projectKey, captureId).queryKey }),
  });
}
