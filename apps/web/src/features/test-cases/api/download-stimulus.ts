import { useMutation } from '@tanstack/react-query';
import { apiRequestBinary } from '@/lib/api-client';
import { saveBlob } from '@/lib/download';
import { testCasesPath } from './get-test-cases';

/** The stimulus needs the bearer token, so it is fetched through the client and saved as a file. */
export async function downloadStimulus(projectKey: string, caseKey: string): Promise<void> {
  const bytes = await apiRequestBinary(`${testCasesPath(projectKey)}/${encodeURIComponent(caseKey)}/stimulus.wav`, { accept: 'audio/wav' });
  saveBlob(new Blob([bytes], { type: 'audio/wav' }), `${projectKey}-${caseKey}-stimulus.wav`);
}

export function useDownloadStimulus(projectKey: string) {
  return useMutation({ mutationFn: (caseKey: string) => downloadStimulus(projectKey, caseKey) });
}
