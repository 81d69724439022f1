import type { CaptureDetail } from '@earmark/contracts';
import { Button } from '@/components/button';
import { notify } from '@/components/toast';
import { useProjectAbilities } from '@/lib/authorization';
import { useDownloadCapture } from '../api/download-capture';
import { isCaptureInProgress } from '../api/get-capture';
import { useReanalyseCapture } from '../api/reanalyse-capture';

const messageOf = (error: unknown) => (error instanceof Error && 'detail' in error && typeof error.detail === 'string' ? error.detail : error instanceof Error ? error.message : String(error));

/**
 * What an engineer does with a capture besides reading it: take the file away, or have it judged
 * again (after an analysis error, or to see it under the mask in force now). Both need the
 * stored audio, so a purged capture offers neither and says why.
 */
export function CaptureActions({ projectKey, detail }: { projectKey: string; detail: CaptureDetail }) {
  const { canSubmit } = useProjectAbilities(projectKey);
  const download = useDownloadCapture(projectKey, detail);
  const reanalyse = useReanalyseCapture(projectKey, detail.capture.id);
  const purged = detail.capture.purgedAt !== null;
  const running = isCaptureInProgress(detail.capture.status);

  const onDownload = () =>
    download.mutate(undefined, {
      onSuccess: ({ filename }) => notify.success('Capture downloaded', `${filename}, exactly as uploaded.`),
      onError: (error) => notify.error('The capture could not be downloaded', messageOf(error)),
    });
  const onReanalyse = () =>
    reanalyse.mutate(undefined, {
      onSuccess: () => notify.success('Analysis queued', 'This page follows the new analysis and shows its verdict when it is ready.'),
      onError: (error) => notify.error('The capture could not be analysed again', messageOf(error)),
    });

  return (
    <div role="group" aria-label="Capture actions" className="flex flex-wrap items-center gap-2">
      <Button variant="secondary" onClick={onDownload} busy={download.isPending} disabled={purged} title={purged ? 'The retention policy removed the audio' : undefined}>
        Download capture (WAV)
      </Button>
      {canSubmit ? (
        <Button
          variant="secondary"
          onClick={onReanalyse}
          busy={reanalyse.isPending}
          disabled={purged || running}
          title={purged ? 'The retention policy removed the audio' : running ? 'An analysis is already running' : 'Judge the stored capture again under the mask in force'}
        >
          Analyse again
        </Button>
      ) : null}
    </div>
  );
}
