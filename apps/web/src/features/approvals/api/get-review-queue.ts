import { ProjectMaskRevisionList, type MaskRevisionDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { approvalsKeyRoot, projectPath } from './keys';

/** Every revision of the project waiting for a QA manager, across test cases. */
export async function getReviewQueue(projectKey: string, signal?: AbortSignal): Promise<MaskRevisionDto[]> {
  const { items } = await apiRequest(`${projectPath(projectKey)}/masks?state=in_review`, { schema: ProjectMaskRevisionList, signal });
  return items;
}

export function getReviewQueueQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: [...approvalsKeyRoot(projectKey), 'revisions'] as const,
    queryFn: ({ signal }) => getReviewQueue(projectKey, signal),
  });
}

export function useReviewQueue(projectKey: string) {
  return useQuery(getReviewQueueQueryOptions(projectKey));
}
