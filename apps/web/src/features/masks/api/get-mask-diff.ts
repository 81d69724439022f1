import { MaskDiff } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { masksKeyRoot, revisionPath } from './keys';

export function getMaskDiff(projectKey: string, caseKey: string, revision: number, base: number | null, signal?: AbortSignal): Promise<MaskDiff> {
  const query = base === null ? '' : `?base=${base}`;
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/diff${query}`, { schema: MaskDiff, signal });
}

export function getMaskDiffQueryOptions(projectKey: string, caseKey: string, revision: number, base: number | null) {
  return queryOptions({
    queryKey: [...masksKeyRoot(projectKey, caseKey), 'diff', revision, base] as const,
    queryFn: ({ signal }) => getMaskDiff(projectKey, caseKey, revision, base, signal),
  });
}

export function useMaskDiff(projectKey: string, caseKey: string, revision: number, base: number | null) {
  return useQuery(getMaskDiffQueryOptions(projectKey, caseKey, revision, base));
}
