import type { AudioKind } from '@earmark/contracts';
import { queryOptions } from '@tanstack/react-query';
import { apiRequestBinary } from '@/lib/api-client';
import { capturePath } from './get-capture';

/** The capture, its stimulus or the residual as 32-bit float WAV bytes. */
export function getCaptureAudio(projectKey: string, captureId: string, kind: AudioKind, signal?: AbortSignal): Promise<ArrayBuffer> {
  return apiRequestBinary(`${capturePath(projectKey, captureId)}/audio/${kind}`, { signal, accept: 'audio/wav' });
}

export function getCaptureAudioQueryOptions(projectKey: string, captureId: string, kind: AudioKind) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'captures', captureId, 'audio', kind],
    queryFn: ({ signal }) => getCaptureAudio(projectKey, captureId, kind, signal),
    // The bytes of a stored capture never change; a few MB is worth keeping for replays.
    staleTime: Infinity,
    gcTime: 5 * 60_000,
  });
}
