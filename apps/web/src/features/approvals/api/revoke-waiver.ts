import { WaiverDto, type WaiverRevokeRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { projectPath } from './keys';

export function revokeWaiver(projectKey: string, waiverId: string, body: WaiverRevokeRequest): Promise<WaiverDto> {
  return apiRequest(`${projectPath(projectKey)}/waivers/${encodeURIComponent(waiverId)}/revoke`, { method: 'POST', body, schema: WaiverDto });
}

/**
 * Revokes an approved waiver. The API judges the captures it covered again at once, so the
 * waiver lists, findings, builds and captures of the project all refresh (as after a decision).
 */
export function useRevokeWaiver(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ waiverId, body }: { waiverId: string; body: WaiverRevokeRequest }) => revokeWaiver(projectKey, waiverId, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['projects', projectKey] }),
  });
}
