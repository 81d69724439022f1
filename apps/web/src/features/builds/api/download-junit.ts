import { useMutation } from '@tanstack/react-query';
import { apiRequestBinary } from '@/lib/api-client';
import { saveBlob } from '@/lib/download';
import { shortSha } from '@/lib/sha';

/**
 * The JUnit report is a CI route that needs the bearer token, so a plain link would be
 * refused: fetch it through the API client and hand the bytes to the browser as a file.
 */
export async function downloadJunit(projectKey: string, sha: string): Promise<void> {
  const bytes = await apiRequestBinary(
    `/api/v1/projects/${encodeURIComponent(projectKey)}/builds/${encodeURIComponent(sha)}/junit.xml`,
    { accept: 'application/xml' },
  );
  saveBlob(new Blob([bytes], { type: 'application/xml' }), `${projectKey}-${shortSha(sha)}-junit.xml`);
}

export function useDownloadJunit(projectKey: string, sha: string) {
  return useMutation({ mutationFn: () => downloadJunit(projectKey, sha) });
}
