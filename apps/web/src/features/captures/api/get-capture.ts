import { CaptureDetail, type CaptureStatus } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

export function capturePath(projectKey: string, captureId: string): string {
  return `/api/projects/${encodeURIComponent(projectKey)}/captures/${encodeURIComponent(captureId)}`;
}

export function getCapture(projectKey: string, captureId: string, signal?: AbortSignal): Promise<CaptureDetail> {
  return apiRequest(capturePath(projectKey, captureId), { schema: CaptureDetail, signal });
}

/** Still being worked on by the analysis worker: the page polls until it is not. */
export function isCaptureInProgress(status: CaptureStatus): boolean {
  return status === 'queued' || status === 'analysing';
}

/** How often to ask again while the worker analyses (a 10 s capture takes about a second). */
export const CAPTURE_POLL_MS = 1500;

export function getCaptureQueryOptions(projectKey: string, captureId: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'captures', captureId],
    queryFn: ({ signal }) => getCapture(projectKey, captureId, signal),
    refetchInterval: (query) => (query.state.data && isCaptureInProgress(query.state.data.capture.status) ? CAPTURE_POLL_MS : false),
  });
}

export function useCapture(projectKey: string, captureId: string) {
  return useQuery(getCaptureQueryOptions(projectKey, captureId));
}
