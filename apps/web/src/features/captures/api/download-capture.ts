import type { CaptureDetail } from '@earmark/contracts';
import { useMutation } from '@tanstack/react-query';
import { apiRequestBinary } from '@/lib/api-client';
import { saveBlob } from '@/lib/download';
import { capturePath } from './get-capture';

/** `tone.pair_board-a_c0ffee1`: test case, target and build, so a folder of downloads sorts itself. */
export function captureFileStem(detail: Pick<CaptureDetail, 'testCase' | 'target' | 'build'>): string {
  return `${detail.testCase.key}_${detail.target.key}_${detail.build.sha.slice(0, 7)}`;
}

const isWav = (bytes: ArrayBuffer) => bytes.byteLength >= 4 && new TextDecoder('ascii').decode(new Uint8Array(bytes, 0, 4)) === 'RIFF';

/**
 * The capture exactly as uploaded (the route needs the bearer token, so no plain link). A raw
 * float upload keeps its bytes and gets `.f32`; a purged capture rejects with the API's 410 words.
 */
export async function downloadCapture(projectKey: string, detail: CaptureDetail): Promise<{ filename: string; bytes: number }> {
  const bytes = await apiRequestBinary(`${capturePath(projectKey, detail.capture.id)}/download`, { accept: 'audio/wav, application/octet-stream, application/x-earmark-f32le' });
  const wav = isWav(bytes);
  const filename = `${captureFileStem(detail)}.${wav ? 'wav' : 'f32'}`;
  saveBlob(new Blob([bytes], { type: wav ? 'audio/wav' : 'application/octet-stream' }), filename);
  return { filename, bytes: bytes.byteLength };
}

export function useDownloadCapture(projectKey: string, detail: CaptureDetail) {
  return useMutation({ mutationFn: () => downloadCapture(projectKey, detail) });
}
