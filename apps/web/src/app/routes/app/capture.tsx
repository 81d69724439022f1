import type { CaptureDetail } from '@earmark/contracts';
import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { useParams } from 'react-router';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { Skeleton } from '@/components/skeleton';
import { getCaptureQueryOptions, isCaptureInProgress, useCapture } from '@/features/captures/api/get-capture';
import { AnalysisFailed, AnalysisProgress, CaptureHeader } from '@/features/captures/components/capture-header';
import { CaptureActions } from '@/features/captures/components/capture-actions';
import { ChecksTable } from '@/features/captures/components/checks-table';
import { ListenPanel } from '@/features/captures/components/listen-panel';
import { PurgedAudioNote } from '@/features/captures/components/purged-audio-note';
import { ResponsePanel } from '@/features/captures/components/response-panel';
import { SpectrumPanel } from '@/features/captures/components/spectrum-panel';
import { WaveformPanel } from '@/features/captures/components/waveform-panel';
import { useCaptureView } from '@/features/captures/hooks/use-capture-view';
import { defaultPlotSelection } from '@/features/captures/utils/plot-selection';
import { FindingsTriagePanel } from '@/features/findings/components/findings-triage-panel';
import { requireSession } from '../require-session';

export const captureLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    // The route only matches with both, so a missing one is a bug in the route table.
    if (!params.projectKey || !params.captureId) throw new Error('projectKey and captureId route parameters are missing');
    await queryClient.ensureQueryData(getCaptureQueryOptions(params.projectKey, params.captureId));
    return null;
  });

function CaptureSkeleton() {
  return (
    <div className="space-y-6" aria-busy="true">
      <PageHeader eyebrow="Capture" title={<Skeleton className="h-8 w-72" />} />
      <Skeleton className="h-[460px] rounded-lg" />
    </div>
  );
}

/**
 * The capture page: why a capture failed. Plots, checks and listening come from
 * features/captures and the triage panel from features/findings; they meet only here.
 */
export function CaptureRoute() {
  const { projectKey = '', captureId = '' } = useParams();
  const capture = useCapture(projectKey, captureId);

  if (capture.isPending) return <CaptureSkeleton />;
  if (capture.isError) return <ErrorState error={capture.error} onRetry={() => void capture.refetch()} />;
  // Keyed so zoom, check, channel and playback start afresh on another capture, and the view
  // opens on the worst check again when a new analysis (re-analyse) brings a new verdict.
  const judgedAt = capture.data.capture.verdict?.createdAt ?? 'none';
  return <CaptureWorkspace key={`${projectKey}/${captureId}/${judgedAt}`} projectKey={projectKey} captureId={captureId} detail={capture.data} />;
}

function CaptureWorkspace({ projectKey, captureId, detail }: { projectKey: string; captureId: string; detail: CaptureDetail }) {
  const initial = useMemo(() => defaultPlotSelection(detail), [detail]);
  const view = useCaptureView({ hasLastPassing: detail.lastPassing !== null, initial });
  const status = detail.capture.status;
  const inProgress = isCaptureInProgress(status);
  const analysed = !inProgress && detail.capture.verdict !== null;
  // Audio removed by the retention policy: the verdict and checks stay, the plots and player go.
  const purgedAt = detail.capture.purgedAt;
  const plotted = analysed && !purgedAt;

  return (
    <div className="space-y-6">
      <title>{`${detail.testCase.name} · ${detail.build.sha.slice(0, 7)} · Earmark`}</title>
      <CaptureHeader detail={detail} />
      <CaptureActions projectKey={projectKey} detail={detail} />

      {status === 'queued' || status === 'analysing' ? <AnalysisProgress status={status} /> : null}

      {plotted ? <SpectrumPanel projectKey={projectKey} captureId={captureId} detail={detail} view={view} /> : null}

      {analysed ? (
        <ChecksTable checks={detail.capture.verdict?.checks ?? []} onShowFrequency={view.showFrequency} />
      ) : !inProgress ? (
        <AnalysisFailed />
      ) : null}

      <div aria-label="Listening and triage" role="group" className="grid grid-cols-1 items-start gap-6 lg:grid-cols-2 [&>*]:min-w-0">
        {purgedAt ? <PurgedAudioNote purgedAt={purgedAt} /> : <ListenPanel projectKey={projectKey} captureId={captureId} />}
        <FindingsTriagePanel projectKey={projectKey} captureId={captureId} />
      </div>

      {plotted ? (
        <>
          <ResponsePanel projectKey={projectKey} captureId={captureId} view={view} />
          <WaveformPanel projectKey={projectKey} captureId={captureId} detail={detail} view={view} />
        </>
      ) : null}
    </div>
  );
}
