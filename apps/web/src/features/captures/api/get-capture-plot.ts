import { CapturePlot } from '@earmark/contracts';
import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { capturePath } from './get-capture';

export type CapturePlotParams = {
  /** Plot columns to decimate into, about the plot's width in device pixels (64…4096). */
  columns: number;
  channel: number;
  overlay: 'last-passing' | 'none';
  /** The spectral check whose limits are drawn; null: the mask has none (the API's default). */
  check: string | null;
};

export function getCapturePlot(projectKey: string, captureId: string, params: CapturePlotParams, signal?: AbortSignal): Promise<CapturePlot> {
  const query = new URLSearchParams({ columns: String(params.columns), channel: String(params.channel), overlay: params.overlay });
  if (params.check) query.set('check', params.check);
  return apiRequest(`${capturePath(projectKey, captureId)}/plot?${query.toString()}`, { schema: CapturePlot, signal });
}

export function getCapturePlotQueryOptions(projectKey: string, captureId: string, params: CapturePlotParams) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'captures', captureId, 'plot', params],
    queryFn: ({ signal }) => getCapturePlot(projectKey, captureId, params, signal),
    // A finished analysis does not change; only a re-analysis (new verdict) would.
    staleTime: 5 * 60_000,
    // Resizing asks for a different column count: keep drawing the old one meanwhile.
    placeholderData: keepPreviousData,
  });
}

export function useCapturePlot(projectKey: string, captureId: string, params: CapturePlotParams | null) {
  return useQuery({
    ...getCapturePlotQueryOptions(projectKey, captureId, params ?? { columns: 0, channel: 0, overlay: 'none', check: null }),
    enabled: params !== null,
  });
}
