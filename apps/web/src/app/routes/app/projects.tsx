import type { QueryClient } from '@tanstack/react-query';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { useMe } from '@/features/auth/api/get-me';
import { getProjectsQueryOptions, useProjects } from '@/features/projects/api/get-projects';
import { ProjectsTable, ProjectsTableSkeleton } from '@/features/projects/components/projects-table';
import { formatCount } from '@/lib/format';
import { requireSession } from '../require-session';

export const projectsLoader = (queryClient: QueryClient) =>
  requireSession(async () => {
    await queryClient.ensureQueryData(getProjectsQueryOptions());
    return null;
  });

export function ProjectsRoute() {
  const projects = useProjects();
  const me = useMe();
  const count = projects.data?.length;

  return (
    <div className="space-y-6">
      <title>Projects · Earmark</title>
      <PageHeader
        eyebrow="Workspace"
        title="Projects"
        titleAside={
          count !== undefined ? (
            <span className="font-mono text-sm tabular-nums text-ink-500">
              {formatCount(count)}
              <span className="sr-only"> projects</span>
            </span>
          ) : null
        }
        description="Firmware product lines you can see, with your role in each."
      />
      {projects.isPending ? (
        <ProjectsTableSkeleton />
      ) : projects.isError ? (
        <ErrorState error={projects.error} onRetry={() => void projects.refetch()} />
      ) : projects.data.length === 0 ? (
        <EmptyState title="No projects yet">
          {me.data?.isAdmin
            ? 'Nobody has created a project in Earmark yet. Create one under Admin → Projects (the user menu).'
            : 'You are not a member of any project. Ask an Earmark administrator to add you to one.'}
        </EmptyState>
      ) : (
        <ProjectsTable projects={projects.data} />
      )}
    </div>
  );
}
