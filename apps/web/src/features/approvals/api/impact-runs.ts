import { ImpactRunDto, type CreateImpactRunRequest } from '@earmark/contracts';
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';
import { approvalsKeyRoot, revisionPath } from './keys';

/** How often a queued or running impact run is asked for its progress. */
export const IMPACT_POLL_MS = 1000;

const RunList = z.object({ items: z.array(ImpactRunDto) });

function impactKey(projectKey: string, caseKey: string, revision: number) {
  return [...approvalsKeyRoot(projectKey), 'impact', caseKey, revision] as const;
}

export async function getLatestImpactRun(projectKey: string, caseKey: string, revision: number, signal?: AbortSignal): Promise<ImpactRunDto | null> {
  const { items } = await apiRequest(`${revisionPath(projectKey, caseKey, revision)}/impact`, { schema: RunList, signal });
  return items[0] ?? null;
}

export function getImpactRun(projectKey: string, caseKey: string, revision: number, runId: string, signal?: AbortSignal): Promise<ImpactRunDto> {
  return apiRequest(`${revisionPath(projectKey, caseKey, revision)}/impact/${encodeURIComponent(runId)}`, { schema: ImpactRunDto, signal });
}

export const unfinished = (run: ImpactRunDto | null | undefined) => run?.state === 'queued' || run?.state === 'running';

/** The revision's newest impact run, or null before the first. */
export function getLatestImpactRunQueryOptions(projectKey: string, caseKey: string, revision: number) {
  return queryOptions({
    queryKey: [...impactKey(projectKey, caseKey, revision), 'latest'] as const,
    queryFn: ({ signal }) => getLatestImpactRun(projectKey, caseKey, revision, signal),
  });
}

export function useLatestImpactRun(projectKey: string, caseKey: string, revision: number) {
  return useQuery(getLatestImpactRunQueryOptions(projectKey, caseKey, revision));
}

/** One run, polled for its progress while it is queued or running. */
export function getImpactRunQueryOptions(projectKey: string, caseKey: string, revision: number, runId: string) {
  return queryOptions({
    queryKey: [...impactKey(projectKey, caseKey, revision), 'run', runId] as const,
    queryFn: ({ signal }) => getImpactRun(projectKey, caseKey, revision, runId, signal),
    refetchInterval: (query) => (unfinished(query.state.data) ? IMPACT_POLL_MS : false),
  });
}

export function useImpactRun(projectKey: string, caseKey: string, revision: number, runId: string | null, initial: ImpactRunDto | null) {
  return useQuery({
    ...getImpactRunQueryOptions(projectKey, caseKey, revision, runId ?? ''),
    enabled: runId !== null,
    // The list (or the start) already answered with this run: show it while the first poll is out.
    initialData: initial && initial.id === runId ? initial : undefined,
    // A finished run from the list is final; an unfinished one is polled straight away.
    initialDataUpdatedAt: initial && !unfinished(initial) ? Date.now() : 0,
  });
}

/** Starts a run; the panel then follows it by id until it is done. */
export function useStartImpactRun(projectKey: string, caseKey: string, revision: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateImpactRunRequest) =>
      apiRequest(`${revisionPath(projectKey, caseKey, revision)}/impact`, { method: 'POST', body, schema: ImpactRunDto }),
    onSuccess: (run) => {
      queryClient.setQueryData(getLatestImpactRunQueryOptions(projectKey, caseKey, revision).queryKey, run);
    },
  });
}
