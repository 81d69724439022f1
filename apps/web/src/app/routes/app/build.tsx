import type { QueryClient } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { Button } from '@/components/button';
import { ErrorState } from '@/components/error-state';
import { InlineError } from '@/components/inline-error';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { Skeleton } from '@/components/skeleton';
import { VerdictBadge } from '@/components/verdict-badge';
import { useDownloadJunit } from '@/features/builds/api/download-junit';
import { getBuildMatrixQueryOptions, useBuildMatrix } from '@/features/builds/api/get-build-matrix';
import { BuildMatrix } from '@/features/builds/components/build-matrix';
import { BuildSummaryPanel } from '@/features/builds/components/build-summary';
import { DriftNotice } from '@/features/builds/components/drift-notice';
import { PipelineLink } from '@/features/builds/components/pipeline-link';
import { paths } from '@/lib/paths';
import { shortSha } from '@/lib/sha';
import { requireSession } from '../require-session';

export const buildLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey || !params.sha) throw new Error('projectKey and sha route parameters are missing');
    await queryClient.ensureQueryData(getBuildMatrixQueryOptions(params.projectKey, params.sha));
    return null;
  });

function DownloadJunitButton({ projectKey, sha }: { projectKey: string; sha: string }) {
  const download = useDownloadJunit(projectKey, sha);
  return (
    <div className="flex flex-col items-end gap-2">
      <Button
        variant="secondary"
        busy={download.isPending}
        onClick={() => download.mutate()}
        icon={
          <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
            <path d="M8 2.5v8m0 0 3-3m-3 3-3-3M3 13.5h10" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
        }
      >
        JUnit XML
      </Button>
      {download.error ? <InlineError error={download.error} className="max-w-sm" /> : null}
    </div>
  );
}

export function BuildRoute() {
  const { projectKey = '', sha = '' } = useParams();
  const matrix = useBuildMatrix(projectKey, sha);
  const eyebrow = <ProjectBreadcrumb projectKey={projectKey} section={{ label: 'Builds', to: paths.builds(projectKey) }} />;

  if (matrix.isPending) {
    return (
      <div className="space-y-6" aria-busy="true">
        <PageHeader eyebrow={eyebrow} title={`Build ${shortSha(sha)}`} />
        <Skeleton className="h-32 rounded-lg" />
        <Skeleton className="h-64 rounded-lg" />
      </div>
    );
  }
  if (matrix.isError) {
    return (
      <div className="space-y-6">
        <PageHeader eyebrow={eyebrow} title={`Build ${shortSha(sha)}`} />
        <ErrorState error={matrix.error} onRetry={() => void matrix.refetch()} />
      </div>
    );
  }

  const { build } = matrix.data;
  return (
    <div className="space-y-6">
      <title>{`Build ${shortSha(build.sha)} · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={eyebrow}
        title={`Build ${shortSha(build.sha)}`}
        titleAside={<VerdictBadge verdict={build.status} />}
        description={
          [build.label, build.branch ? `on ${build.branch}` : null].filter(Boolean).join(' · ') || 'No label or branch was given for this build.'
        }
        actions={
          <>
            <PipelineLink url={build.pipelineUrl} />
            <DownloadJunitButton projectKey={projectKey} sha={build.sha} />
          </>
        }
      />
      <BuildSummaryPanel projectKey={projectKey} matrix={matrix.data} />
      <DriftNotice drift={matrix.data.drift ?? []} />
      {matrix.data.cells.length === 0 ? (
        <p className="rounded-lg border border-dashed border-line-strong px-6 py-10 text-center text-sm text-ink-600">
          No captures have been uploaded for this build yet. They appear here as CI sends them.
        </p>
      ) : (
        <BuildMatrix projectKey={projectKey} matrix={matrix.data} />
      )}
    </div>
  );
}
