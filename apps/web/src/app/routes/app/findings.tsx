import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { useParams, useSearchParams, type ShouldRevalidateFunctionArgs } from 'react-router';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { getTargetsQueryOptions, useTargets } from '@/features/builds/api/get-targets';
import { getFindingsQueryOptions } from '@/features/findings/api/get-findings';
import { getMembersQueryOptions } from '@/features/findings/api/get-members';
import { FindingsQueue } from '@/features/findings/components/findings-queue';
import { findingsUrlParams, parseFindingsSearch, type FindingsSearch } from '@/features/findings/utils/findings-search';
import { requireSession } from '../require-session';

export const findingsLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params, request }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    const search = parseFindingsSearch(new URL(request.url).searchParams);
    void queryClient.prefetchQuery(getMembersQueryOptions(params.projectKey));
    void queryClient.prefetchQuery(getTargetsQueryOptions(params.projectKey));
    await queryClient.ensureQueryData(getFindingsQueryOptions(params.projectKey, search));
    return null;
  });

/** Filter and page changes are search-param changes the queue's query follows by itself. */
export function findingsShouldRevalidate({ currentUrl, nextUrl, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return currentUrl.pathname === nextUrl.pathname ? false : defaultShouldRevalidate;
}

export function FindingsRoute() {
  const { projectKey = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const search = useMemo(() => parseFindingsSearch(params), [params]);
  const targets = useTargets(projectKey);

  return (
    <div className="space-y-5">
      <title>{`Findings · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Findings"
        description="Failing checks that need a person: assign them, follow them through investigation, and record how they ended."
      />
      <FindingsQueue
        projectKey={projectKey}
        search={search}
        targets={targets.data ?? []}
        onSearchChange={(next: FindingsSearch) => setParams(findingsUrlParams(next))}
      />
    </div>
  );
}
