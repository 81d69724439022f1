import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, redirect, type RouteObject } from 'react-router';
import { FullPageLoading } from '@/components/full-page-status';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { paths } from '@/lib/paths';
import { AccountRoute, accountLoader } from './routes/app/account';
import { BuildRoute, buildLoader } from './routes/app/build';
import { BuildsRoute, buildsLoader, buildsShouldRevalidate } from './routes/app/builds';
import { CaptureRoute, captureLoader } from './routes/app/capture';
import { FindingsRoute, findingsLoader, findingsShouldRevalidate } from './routes/app/findings';
import { ApprovalsRoute, approvalsLoader } from './routes/app/approvals';
import { AuditRoute, auditLoader, auditShouldRevalidate } from './routes/app/audit';
import { MasksRoute, masksLoader } from './routes/app/masks';
import { TestCasesRoute, testCasesLoader } from './routes/app/test-cases';
import { ProjectRoute, projectLoader } from './routes/app/project';
import { ProjectsRoute, projectsLoader } from './routes/app/projects';
import { TokensRoute, tokensLoader } from './routes/app/tokens';
import { NotFoundRoute } from './routes/not-found';
import {
  AdminAuditRoute,
  AdminLayout,
  AdminProjectsRoute,
  AdminUsersRoute,
  adminAuditLoader,
  adminAuditShouldRevalidate,
  adminProjectsLoader,
  adminUsersLoader,
} from './routes/app/admin';
import { MembersRoute, membersLoader } from './routes/app/members';
import { SetPasswordRoute } from './routes/set-password';
import { requireSession } from './routes/require-session';
import { RootErrorBoundary, RouteErrorBoundary } from './routes/route-error';
import { SignInRoute, signInLoader } from './routes/sign-in';
import { AppShell } from './shell/app-shell';

/**
 * The route table, separate from the router so tests can mount it in a memory router.
 * Loaders prefetch with the same query-options factories the pages read through, so the
 * page renders from cache and TanStack Query keeps it fresh afterwards.
 */
export function createAppRoutes(queryClient: QueryClient): RouteObject[] {
  return [
    {
      path: '/sign-in',
      loader: signInLoader,
      Component: SignInRoute,
      ErrorBoundary: RootErrorBoundary,
      HydrateFallback: FullPageLoading,
    },
    {
      // Opened from a mailed invitation or reset link, before the person can sign in.
      path: '/set-password/:secret',
      Component: SetPasswordRoute,
      ErrorBoundary: RootErrorBoundary,
      HydrateFallback: FullPageLoading,
    },
    {
      id: 'app',
      path: '/',
      // Validates a stored session against the API on start-up (and is a cache hit after).
      loader: requireSession(async () => {
        await queryClient.ensureQueryData(getMeQueryOptions());
        return null;
      }),
      Component: AppShell,
      ErrorBoundary: RootErrorBoundary,
      HydrateFallback: FullPageLoading,
      children: [
        { index: true, loader: () => redirect(paths.projects()) },
        {
          ErrorBoundary: RouteErrorBoundary,
          children: [
            { path: 'projects', loader: projectsLoader(queryClient), Component: ProjectsRoute },
            { path: 'account', loader: accountLoader(queryClient), Component: AccountRoute },
            { path: 'projects/:projectKey', loader: projectLoader(queryClient), Component: ProjectRoute },
            {
              path: 'projects/:projectKey/builds',
              loader: buildsLoader(queryClient),
              shouldRevalidate: buildsShouldRevalidate,
              Component: BuildsRoute,
            },
            { path: 'projects/:projectKey/builds/:sha', loader: buildLoader(queryClient), Component: BuildRoute },
            {
              path: 'projects/:projectKey/builds/:sha/captures/:captureId',
              loader: captureLoader(queryClient),
              Component: CaptureRoute,
            },
            {
              path: 'projects/:projectKey/findings',
              loader: findingsLoader(queryClient),
              shouldRevalidate: findingsShouldRevalidate,
              Component: FindingsRoute,
            },
            { path: 'projects/:projectKey/tokens', loader: tokensLoader(queryClient), Component: TokensRoute },
            { path: 'projects/:projectKey/test-cases', loader: testCasesLoader(queryClient), Component: TestCasesRoute },
            { path: 'projects/:projectKey/test-cases/:caseKey/masks', loader: masksLoader(queryClient), Component: MasksRoute },
            { path: 'projects/:projectKey/approvals', loader: approvalsLoader(queryClient), Component: ApprovalsRoute },
            {
              path: 'projects/:projectKey/audit',
              loader: auditLoader(queryClient),
              shouldRevalidate: auditShouldRevalidate,
              Component: AuditRoute,
            },
            { path: 'projects/:projectKey/members', loader: membersLoader(queryClient), Component: MembersRoute },
            { path: 'users', loader: () => redirect(paths.adminUsers()) },
            {
              path: 'admin',
              Component: AdminLayout,
              children: [
                { index: true, loader: () => redirect(paths.adminUsers()) },
                { path: 'users', loader: adminUsersLoader(queryClient), Component: AdminUsersRoute },
                { path: 'projects', loader: adminProjectsLoader(queryClient), Component: AdminProjectsRoute },
                { path: 'audit', loader: adminAuditLoader(queryClient), shouldRevalidate: adminAuditShouldRevalidate, Component: AdminAuditRoute },
              ],
            },
            { path: '*', Component: NotFoundRoute },
          ],
        },
      ],
    },
  ];
}

export function createAppRouter(queryClient: QueryClient) {
  return createBrowserRouter(createAppRoutes(queryClient));
}
