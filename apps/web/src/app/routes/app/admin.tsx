import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Outlet, useSearchParams, type ShouldRevalidateFunctionArgs } from 'react-router';
import { Button } from '@/components/button';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { Pagination } from '@/components/pagination';
import { Skeleton } from '@/components/skeleton';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { getAllProjectsQueryOptions, useAllProjects } from '@/features/admin/api/admin-projects';
import { getUsersQueryOptions, useUsers } from '@/features/admin/api/users';
import { getWorkspaceAuditQueryOptions, useWorkspaceAudit } from '@/features/admin/api/workspace-audit';
import { AdminTabs } from '@/features/admin/components/admin-tabs';
import { CreateProjectDialog } from '@/features/admin/components/create-project-dialog';
import { InviteUserDialog } from '@/features/admin/components/invite-user-dialog';
import { ProjectsAdminTable } from '@/features/admin/components/projects-admin-table';
import { UsersTable } from '@/features/admin/components/users-table';
import { WorkspaceAuditFilters, type WorkspaceAuditFilterPatch } from '@/features/admin/components/workspace-audit-filters';
import { WorkspaceAuditTable } from '@/features/admin/components/workspace-audit-table';
import { hasWorkspaceAuditFilter, parseWorkspaceAuditSearch, workspaceAuditParams, type WorkspaceAuditSearch } from '@/features/admin/utils/workspace-audit-search';
import { useCurrentUser } from '@/lib/authorization';
import { requireSession } from '../require-session';

/** Prefetches one admin tab's data for administrators; others see the explanation, not a 403. */
const adminLoader = (queryClient: QueryClient, prefetch: (request: Request) => Promise<unknown>) =>
  requireSession(async ({ request }) => {
    const me = await queryClient.ensureQueryData(getMeQueryOptions());
    if (me.isAdmin) await prefetch(request);
    return null;
  });

export const adminUsersLoader = (queryClient: QueryClient) => adminLoader(queryClient, () => queryClient.ensureQueryData(getUsersQueryOptions()));
export const adminProjectsLoader = (queryClient: QueryClient) => adminLoader(queryClient, () => queryClient.ensureQueryData(getAllProjectsQueryOptions()));
export const adminAuditLoader = (queryClient: QueryClient) =>
  adminLoader(queryClient, (request) => queryClient.ensureQueryData(getWorkspaceAuditQueryOptions(parseWorkspaceAuditSearch(new URL(request.url).searchParams))));

/** Filtering and paging only change the URL; the query follows it. */
export function adminAuditShouldRevalidate({ currentUrl, nextUrl, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return currentUrl.pathname === nextUrl.pathname ? false : defaultShouldRevalidate;
}

/** The admin area: a heading, the Users / Projects / Audit log tabs, and the tab's page. */
export function AdminLayout() {
  const me = useCurrentUser();
  return (
    <div className="space-y-5">
      <PageHeader eyebrow="Workspace" title="Administration" description="People, projects and everything that changed, across the whole workspace." />
      {me?.isAdmin ? (
        <>
          <AdminTabs />
          <Outlet />
        </>
      ) : (
        <EmptyState title="Only administrators manage the workspace">Ask an Earmark administrator to invite someone, add a member or create a project.</EmptyState>
      )}
    </div>
  );
}

function TableSkeleton() {
  return (
    <div aria-busy="true" className="space-y-2 rounded-lg border border-line bg-paper-raised p-4">
      {Array.from({ length: 5 }, (_, i) => (
        <Skeleton key={i} className="h-8" />
      ))}
    </div>
  );
}

export function AdminUsersRoute() {
  const users = useUsers();
  const me = useCurrentUser();
  const [params] = useSearchParams();
  const [inviting, setInviting] = useState(false);
  return (
    <section aria-labelledby="admin-users-heading" className="space-y-4">
      <title>Users · Administration · Earmark</title>
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h2 id="admin-users-heading" className="text-lg font-semibold text-ink-950">
            Users
          </h2>
          <p className="text-sm text-ink-600">Invited people choose their own password through a one-time link.</p>
        </div>
        <Button onClick={() => setInviting(true)}>Invite person</Button>
      </div>
      {users.isPending ? (
        <TableSkeleton />
      ) : users.isError ? (
        <ErrorState error={users.error} onRetry={() => void users.refetch()} />
      ) : (
        <UsersTable users={users.data} currentUserId={me?.id ?? ''} highlight={params.get('user') ?? undefined} />
      )}
      <InviteUserDialog open={inviting} onClose={() => setInviting(false)} />
    </section>
  );
}

export function AdminProjectsRoute() {
  const projects = useAllProjects();
  const [creating, setCreating] = useState(false);
  return (
    <section aria-labelledby="admin-projects-heading" className="space-y-4">
      <title>Projects · Administration · Earmark</title>
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h2 id="admin-projects-heading" className="text-lg font-semibold text-ink-950">
            Projects
          </h2>
          <p className="text-sm text-ink-600">Archived projects are hidden from everyone else and refuse uploads.</p>
        </div>
        <Button onClick={() => setCreating(true)}>Create project</Button>
      </div>
      {projects.isPending ? (
        <TableSkeleton />
      ) : projects.isError ? (
        <ErrorState error={projects.error} onRetry={() => void projects.refetch()} />
      ) : projects.data.length === 0 ? (
        <EmptyState title="No projects yet">Create one per firmware product line.</EmptyState>
      ) : (
        <ProjectsAdminTable projects={projects.data} />
      )}
      <CreateProjectDialog open={creating} onClose={() => setCreating(false)} />
    </section>
  );
}

export function AdminAuditRoute() {
  const [params, setParams] = useSearchParams();
  const search = parseWorkspaceAuditSearch(params);
  const log = useWorkspaceAudit(search);
  const projects = useAllProjects();
  const go = (next: WorkspaceAuditSearch) => setParams(workspaceAuditParams(next));
  const onFilter = (patch: WorkspaceAuditFilterPatch) => go({ ...search, ...patch, page: 1 });
  const filtered = hasWorkspaceAuditFilter(search);
  return (
    <section aria-labelledby="admin-audit-heading" className="space-y-4">
      <title>Audit log · Administration · Earmark</title>
      <div>
        <h2 id="admin-audit-heading" className="text-lg font-semibold text-ink-950">
          Audit log
        </h2>
        <p className="text-sm text-ink-600">Every change in every project and to the workspace&apos;s people, newest first.</p>
      </div>
      <WorkspaceAuditFilters key={`${search.actor ?? ''}|${search.action ?? ''}`} search={search} projects={projects.data ?? []} onChange={onFilter} />
      {log.isPending ? (
        <TableSkeleton />
      ) : log.isError ? (
        <ErrorState error={log.error} onRetry={() => void log.refetch()} />
      ) : log.data.items.length === 0 ? (
        <EmptyState title={filtered ? 'Nothing matches these filters' : 'Nothing recorded yet'}>{filtered ? 'Clear a filter to see more of the log.' : 'Changes are recorded here as people make them.'}</EmptyState>
      ) : (
        <div className={log.isPlaceholderData ? 'space-y-3 opacity-60 transition-opacity' : 'space-y-3'}>
          <WorkspaceAuditTable rows={log.data.items} />
          <Pagination
            label="Audit log pages"
            page={log.data.page}
            pageSize={log.data.pageSize}
            total={log.data.total}
            pageSizes={[25, 50, 100, 200]}
            onPageChange={(page) => go({ ...search, page })}
            onPageSizeChange={(pageSize) => go({ ...search, pageSize, page: 1 })}
          />
        </div>
      )}
    </section>
  );
}
