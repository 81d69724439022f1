import { CapturePlot } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

/** Columns asked for: enough for a preview panel on a wide screen. */
const PREVIEW_COLUMNS = 768;

export function getPreviewPlot(projectKey: string, captureId: string, signal?: AbortSignal): Promise<CapturePlot> {
  const query = new URLSearchParams({ columns: String(PREVIEW_COLUMNS), overlay: 'none' });
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/captures/${encodeURIComponent(captureId)}/plot?${query.toString()}`, {
    schema: CapturePlot,
    signal,
  });
}

/** Same key shape as the capture page uses for its plot, with its own params, so the entries never collide. */
export function getPreviewPlotQueryOptions(projectKey: string, captureId: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'captures', captureId, 'plot', 'mask-preview'] as const,
    queryFn: ({ signal }) => getPreviewPlot(projectKey, captureId, signal),
    staleTime: 5 * 60_000,
    placeholderData: keepPreviousData,
  });
}

export function usePreviewPlot(projectKey: string, captureId: string | null) {
  return useQuery({ ...getPreviewPlotQueryOptions(projectKey, captureId ?? ''), enabled: captureId !== null });
}
