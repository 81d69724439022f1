import { ProjectSubscription, type SetProjectSubscriptionRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { subscriptionQueryKey } from './get-subscription';

export function setSubscription(projectKey: string, body: SetProjectSubscriptionRequest): Promise<ProjectSubscription> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/subscription`, { method: 'PUT', body, schema: ProjectSubscription });
}

export function useSetSubscription(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (buildFailures: boolean) => setSubscription(projectKey, { buildFailures }),
    // The answer is the stored setting: show it without another round trip.
    onSuccess: (saved) => queryClient.setQueryData(subscriptionQueryKey(projectKey), saved),
  });
}
