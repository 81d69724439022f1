import type { QueryClient } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { Skeleton } from '@/components/skeleton';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { getUsersQueryOptions, useUsers } from '@/features/admin/api/users';
import { getProjectMembersQueryOptions, useProjectMembers } from '@/features/members/api/members';
import { AddMemberForm } from '@/features/members/components/add-member-form';
import { MembersTable } from '@/features/members/components/members-table';
import { abilitiesIn, useProjectAbilities } from '@/lib/authorization';
import { requireSession } from '../require-session';

export const membersLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    const me = await queryClient.ensureQueryData(getMeQueryOptions());
    if (abilitiesIn(me, params.projectKey).canAdminister) {
      await Promise.all([queryClient.ensureQueryData(getProjectMembersQueryOptions(params.projectKey)), queryClient.ensureQueryData(getUsersQueryOptions())]);
    }
    return null;
  });

function MembersContent({ projectKey }: { projectKey: string }) {
  const members = useProjectMembers(projectKey);
  const users = useUsers();
  if (members.isPending) return <Skeleton className="h-40" />;
  if (members.isError) return <ErrorState error={members.error} onRetry={() => void members.refetch()} />;
  return (
    <div className="space-y-4">
      <AddMemberForm projectKey={projectKey} users={users.data ?? []} members={members.data} />
      {members.data.length === 0 ? (
        <EmptyState title="No members yet">Add the engineers, QA managers and viewers who work on this product line.</EmptyState>
      ) : (
        <MembersTable projectKey={projectKey} members={members.data} />
      )}
    </div>
  );
}

export function MembersRoute() {
  const { projectKey = '' } = useParams();
  const { canAdminister } = useProjectAbilities(projectKey);
  return (
    <div className="space-y-5">
      <title>{`Members · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Members"
        description="Who works on this project and in which role. Viewers read; engineers also submit and triage; QA managers also approve masks and decide waivers."
      />
      {canAdminister ? (
        <MembersContent projectKey={projectKey} />
      ) : (
        <EmptyState title="Only administrators manage members">Ask an Earmark administrator to add someone or change a role.</EmptyState>
      )}
    </div>
  );
}
