import { BuildMatrix } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { BUILD_POLL_MS, buildsQueryKeyRoot } from './get-builds';

export function getBuildMatrix(projectKey: string, sha: string, signal?: AbortSignal): Promise<BuildMatrix> {
  return apiRequest(
    `/api/projects/${encodeURIComponent(projectKey)}/builds/${encodeURIComponent(sha)}/matrix`,
    { schema: BuildMatrix, signal },
  );
}

/** A build is still being judged while it is pending/running or any capture awaits a verdict. */
export function isBuildInProgress(matrix: BuildMatrix | undefined): boolean {
  if (!matrix) return false;
  const { status, counts } = matrix.build;
  return status === 'pending' || status === 'running' || counts.pending > 0;
}

export function getBuildMatrixQueryOptions(projectKey: string, sha: string) {
  return queryOptions({
    queryKey: [...buildsQueryKeyRoot(projectKey), 'matrix', sha] as const,
    queryFn: ({ signal }) => getBuildMatrix(projectKey, sha, signal),
    staleTime: 10_000,
    refetchInterval: (query) => (isBuildInProgress(query.state.data) ? BUILD_POLL_MS : false),
  });
}

export function useBuildMatrix(projectKey: string, sha: string) {
  return useQuery(getBuildMatrixQueryOptions(projectKey, sha));
}
