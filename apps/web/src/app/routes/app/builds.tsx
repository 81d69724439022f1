import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { useParams, useSearchParams, type ShouldRevalidateFunctionArgs } from 'react-router';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { Pagination } from '@/components/pagination';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { Skeleton } from '@/components/skeleton';
import { getBuildTrendQueryOptions, useBuildTrend } from '@/features/builds/api/get-build-trend';
import { BUILD_POLL_MS, getBuildsQueryOptions, useBuilds } from '@/features/builds/api/get-builds';
import { getTargetsQueryOptions, useTargets } from '@/features/builds/api/get-targets';
import { BuildTrendChart } from '@/features/builds/components/build-trend-chart';
import { BuildsFilters, type BuildsFilterPatch } from '@/features/builds/components/builds-filters';
import { BuildsTable, BuildsTableSkeleton } from '@/features/builds/components/builds-table';
import {
  buildsSearchParams,
  hasBuildFilters,
  parseBuildsSearch,
  type BuildsSearch,
} from '@/features/builds/utils/builds-search';
import { formatCount } from '@/lib/format';
import { requireSession } from '../require-session';

export const buildsLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params, request }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    const search = parseBuildsSearch(new URL(request.url).searchParams);
    // The chart and the target list are extras: they load alongside, without holding the page.
    void queryClient.prefetchQuery(getBuildTrendQueryOptions(params.projectKey));
    void queryClient.prefetchQuery(getTargetsQueryOptions(params.projectKey));
    await queryClient.ensureQueryData(getBuildsQueryOptions(params.projectKey, search));
    return null;
  });

/**
 * Paging, sorting and filtering only change the search params; the table's query follows
 * the URL and keeps the previous rows on screen meanwhile, so the loader need not hold the
 * navigation (which would make typing a SHA prefix feel sticky).
 */
export function buildsShouldRevalidate({ currentUrl, nextUrl, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  return currentUrl.pathname === nextUrl.pathname ? false : defaultShouldRevalidate;
}

export function BuildsRoute() {
  const { projectKey = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const search = useMemo(() => parseBuildsSearch(params), [params]);
  const builds = useBuilds(projectKey, search);
  const trend = useBuildTrend(projectKey);
  const targets = useTargets(projectKey);

  const go = (next: BuildsSearch) => setParams(buildsSearchParams(next));
  const filter = (patch: BuildsFilterPatch) => go({ ...search, ...patch, page: 1 });
  const live = builds.data?.items.some((build) => build.status === 'pending' || build.status === 'running') ?? false;

  return (
    <div className="space-y-5">
      <title>{`Builds · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Builds"
        titleAside={
          builds.data ? (
            <span className="font-mono text-sm tabular-nums text-ink-500">
              {formatCount(builds.data.total)}
              <span className="sr-only"> builds</span>
            </span>
          ) : null
        }
        description="Firmware builds CI submitted to this project, with the verdict of each capture. Open one for its test case × target matrix."
        actions={
          live ? (
            <span className="inline-flex items-center gap-2 text-xs text-ink-600" role="status">
              <span aria-hidden="true" className="size-2 animate-pulse rounded-full bg-brass-500" />
              Analysis in progress · refreshing every {BUILD_POLL_MS / 1000} s
            </span>
          ) : null
        }
      />
      {trend.data && trend.data.points.length > 1 ? <BuildTrendChart trend={trend.data} /> : trend.isPending ? <Skeleton className="hidden h-[90px] rounded-lg sm:block" /> : null}
      <BuildsFilters
        search={search}
        targets={targets.data ?? []}
        onChange={filter}
        onClear={() => go({ ...search, sha: undefined, branch: undefined, status: undefined, target: undefined, from: undefined, to: undefined, page: 1 })}
      />
      {builds.isPending ? (
        <BuildsTableSkeleton />
      ) : builds.isError ? (
        <ErrorState error={builds.error} onRetry={() => void builds.refetch()} />
      ) : builds.data.items.length === 0 ? (
        hasBuildFilters(search) ? (
          <EmptyState title="No builds match these filters">Clear a filter or widen the date range.</EmptyState>
        ) : (
          <EmptyState title="No builds yet">
            Builds appear here once a CI pipeline submits one with an API token (<code className="font-mono">earmark submit</code>). An
            administrator can create the token under API tokens.
          </EmptyState>
        )
      ) : (
        <>
          <BuildsTable
            projectKey={projectKey}
            builds={builds.data.items}
            sort={search.sort}
            onSortChange={(sort) => go({ ...search, sort, page: 1 })}
            busy={builds.isPlaceholderData}
          />
          <Pagination
            label="Builds pages"
            page={search.page}
            pageSize={search.pageSize}
            total={builds.data.total}
            onPageChange={(page) => go({ ...search, page })}
            onPageSizeChange={(pageSize) => go({ ...search, pageSize, page: 1 })}
          />
        </>
      )}
    </div>
  );
}
