import { ProjectSubscription } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

export function getSubscription(projectKey: string, signal?: AbortSignal): Promise<ProjectSubscription> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/subscription`, { schema: ProjectSubscription, signal });
}

export function subscriptionQueryKey(projectKey: string) {
  return ['projects', projectKey, 'subscription'] as const;
}

export function getSubscriptionQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: subscriptionQueryKey(projectKey),
    queryFn: ({ signal }) => getSubscription(projectKey, signal),
  });
}

export function useSubscription(projectKey: string, enabled = true) {
  return useQuery({ ...getSubscriptionQueryOptions(projectKey), enabled });
}
