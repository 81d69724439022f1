import { BuildMatrix, BuildsPage, type CellOutcome } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { masksKeyRoot } from './keys';

/** How many recent builds offer captures to preview and derive from. */
export const CANDIDATE_BUILDS = 12;

export type CandidateCapture = {
  captureId: string;
  target: string;
  outcome: CellOutcome;
  buildSha: string;
  branch: string | null;
  label: string | null;
  createdAt: string;
};

/**
 * This test case's captures in the project's recent builds, newest build first: the newest
 * builds, then each build's matrix, keeping the cells of this test case.
 */
export async function getCandidateCaptures(projectKey: string, caseKey: string, signal?: AbortSignal): Promise<CandidateCapture[]> {
  const project = `/api/projects/${encodeURIComponent(projectKey)}`;
  const page = await apiRequest(`${project}/builds?page=1&pageSize=${CANDIDATE_BUILDS}&sort=-createdAt`, { schema: BuildsPage, signal });
  const matrices = await Promise.all(
    page.items.map((build) => apiRequest(`${project}/builds/${encodeURIComponent(build.sha)}/matrix`, { schema: BuildMatrix, signal })),
  );
  return matrices.flatMap((matrix) =>
    matrix.cells
      .filter((cell) => cell.testCase === caseKey)
      .map((cell) => ({
        captureId: cell.captureId,
        target: cell.target,
        outcome: cell.outcome,
        buildSha: matrix.build.sha,
        branch: matrix.build.branch,
        label: matrix.build.label,
        createdAt: matrix.build.createdAt,
      })),
  );
}

export function getCandidateCapturesQueryOptions(projectKey: string, caseKey: string) {
  return queryOptions({
    queryKey: [...masksKeyRoot(projectKey, caseKey), 'candidate-captures'] as const,
    queryFn: ({ signal }) => getCandidateCaptures(projectKey, caseKey, signal),
    staleTime: 60_000,
  });
}

export function useCandidateCaptures(projectKey: string, caseKey: string, enabled = true) {
  return useQuery({ ...getCandidateCapturesQueryOptions(projectKey, caseKey), enabled });
}
