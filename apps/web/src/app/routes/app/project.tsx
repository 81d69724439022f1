import type { QueryClient } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { RoleBadge } from '@/components/role-badge';
import { Skeleton } from '@/components/skeleton';
import { getOverviewQueryOptions } from '@/features/projects/api/get-overview';
import { getProjectQueryOptions, useProject } from '@/features/projects/api/get-project';
import { MailSubscription } from '@/features/projects/components/mail-subscription';
import { ProjectOverview } from '@/features/projects/components/project-overview';
import { paths } from '@/lib/paths';
import { requireSession } from '../require-session';

export const projectLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    // The route only matches with a key, so an empty one is a bug in the route table.
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    // The overview loads beside the project; the page shows its skeleton until it arrives.
    void queryClient.prefetchQuery(getOverviewQueryOptions(params.projectKey));
    await queryClient.ensureQueryData(getProjectQueryOptions(params.projectKey));
    return null;
  });

function Breadcrumb({ projectKey }: { projectKey: string }) {
  return (
    <span className="flex items-center gap-1.5 normal-case tracking-normal">
      <Link to={paths.projects()} className="font-semibold uppercase tracking-[0.08em] hover:text-ink-900">
        Projects
      </Link>
      <span aria-hidden="true">/</span>
      <span className="font-mono font-normal text-ink-600">{projectKey}</span>
    </span>
  );
}

export function ProjectRoute() {
  const { projectKey = '' } = useParams();
  const project = useProject(projectKey);

  if (project.isPending) {
    return (
      <div className="space-y-6" aria-busy="true">
        <PageHeader eyebrow={<Breadcrumb projectKey={projectKey} />} title={<Skeleton className="h-8 w-64" />} />
        <div className="grid gap-4 sm:grid-cols-3">
          {[0, 1, 2].map((tile) => (
            <Skeleton key={tile} className="h-24 rounded-lg" />
          ))}
        </div>
      </div>
    );
  }

  if (project.isError) {
    return <ErrorState error={project.error} onRetry={() => void project.refetch()} />;
  }

  return (
    <div className="space-y-6">
      <title>{`${project.data.name} · Earmark`}</title>
      <PageHeader
        eyebrow={<Breadcrumb projectKey={project.data.key} />}
        title={project.data.name}
        actions={
          <span className="flex items-center gap-2 text-xs text-ink-500">
            Your role <RoleBadge role={project.data.myRole} />
          </span>
        }
      />
      <ProjectOverview project={project.data} />
      <MailSubscription project={project.data} />
    </div>
  );
}
