import { MaskRevisionDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';
import { casePath, masksKeyRoot } from './keys';

const RevisionList = z.object({ items: z.array(MaskRevisionDto) });

/** A test case's revisions, newest first. */
export async function getMaskRevisions(projectKey: string, caseKey: string, signal?: AbortSignal): Promise<MaskRevisionDto[]> {
  const { items } = await apiRequest(`${casePath(projectKey, caseKey)}/masks`, { schema: RevisionList, signal });
  return items;
}

export function getMaskRevisionsQueryOptions(projectKey: string, caseKey: string) {
  return queryOptions({
    queryKey: [...masksKeyRoot(projectKey, caseKey), 'list'] as const,
    queryFn: ({ signal }) => getMaskRevisions(projectKey, caseKey, signal),
  });
}

export function useMaskRevisions(projectKey: string, caseKey: string) {
  return useQuery(getMaskRevisionsQueryOptions(projectKey, caseKey));
}
