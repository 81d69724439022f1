import { WaiverDto, type RequestWaiverRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { findingsKeyRoot } from './keys';

export function requestWaiver(projectKey: string, findingId: string, body: RequestWaiverRequest): Promise<WaiverDto> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/findings/${encodeURIComponent(findingId)}/waivers`, { method: 'POST', body, schema: WaiverDto });
}

/** Asks a QA manager to accept a finding's deviation until a date (they see it under Approvals). */
export function useRequestWaiver(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ findingId, body }: { findingId: string; body: RequestWaiverRequest }) => requestWaiver(projectKey, findingId, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: findingsKeyRoot(projectKey) }),
  });
}
