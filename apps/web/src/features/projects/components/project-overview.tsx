import type { Project, ProjectOverview as Overview } from '@earmark/contracts';
import { Link } from 'react-router';
import { ErrorState } from '@/components/error-state';
import { RelativeTime } from '@/components/relative-time';
import { ShortSha } from '@/components/short-sha';
import { Skeleton } from '@/components/skeleton';
import { VerdictBadge } from '@/components/verdict-badge';
import { DriftNotice } from '@/features/builds/components/drift-notice';
import { VerdictCounts } from '@/features/builds/components/verdict-counts';
import { useProjectAbilities } from '@/lib/authorization';
import { formatCount, formatDate } from '@/lib/format';
import { paths } from '@/lib/paths';
import { useOverview } from '../api/get-overview';
import { AwaitingYou } from './awaiting-you';
import { BranchTrends } from './branch-trends';
import { FailingNow } from './failing-now';

/** "Are we green": main's newest build, its verdict and capture counts, and what is open on main. */
function MainVerdict({ projectKey, overview }: { projectKey: string; overview: Overview }) {
  const { main, mainBranch } = overview;
  return (
    <section aria-labelledby="main-verdict" className="rounded-lg border border-line bg-paper-raised px-5 py-4">
      <h2 id="main-verdict" className="text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
        Latest on <span className="font-mono normal-case tracking-normal">{mainBranch}</span>
      </h2>
      {main ? (
        <div className="mt-2 flex flex-wrap items-center gap-x-5 gap-y-2" data-main-status={main.status}>
          <VerdictBadge verdict={main.status} className="h-8 px-3 text-sm" />
          <span className="flex items-center gap-2 text-sm text-ink-700">
            <ShortSha sha={main.sha} to={paths.build(projectKey, main.sha)} />
            <RelativeTime iso={main.createdAt} />
          </span>
          <VerdictCounts counts={main.counts} />
          <Link
            to={paths.findings(projectKey)}
            className="text-sm text-ink-700 underline-offset-4 hover:underline sm:ml-auto"
            data-open-findings={overview.counts.openFindingsOnMain}
          >
            <span className="font-mono tabular-nums">{overview.counts.openFindingsOnMain}</span> open{' '}
            {overview.counts.openFindingsOnMain === 1 ? 'finding' : 'findings'} on {mainBranch}
          </Link>
        </div>
      ) : (
        <p className="mt-2 text-sm text-ink-600">
          No build on <span className="font-mono">{mainBranch}</span> yet. CI uploads with <code className="font-mono">--branch {mainBranch}</code> land here.
        </p>
      )}
    </section>
  );
}

function OverviewSkeleton() {
  return (
    <div className="space-y-4" aria-busy="true" aria-label="Loading the overview">
      <Skeleton className="h-24 rounded-lg" />
      <div className="grid gap-4 lg:grid-cols-2">
        <Skeleton className="h-48 rounded-lg" />
        <Skeleton className="h-48 rounded-lg" />
      </div>
    </div>
  );
}

function AboutProject({ project }: { project: Project }) {
  return (
    <section aria-label="About this project" className="rounded-lg border border-line bg-paper-raised px-5 py-4">
      <h2 className="text-sm font-semibold text-ink-900">About this project</h2>
      <p className="mt-1.5 max-w-3xl text-sm text-ink-700">{project.description || <span className="text-ink-500">No description yet.</span>}</p>
      <dl className="mt-4 flex flex-wrap gap-x-10 gap-y-3 border-t border-line pt-4 text-sm">
        {(
          [
            ['Key', <span className="font-mono">{project.key}</span>],
            ['Targets', <span className="font-mono tabular-nums">{formatCount(project.targetCount)}</span>],
            ['Test cases', <span className="font-mono tabular-nums">{formatCount(project.testCaseCount)}</span>],
            ['Builds', <span className="font-mono tabular-nums">{formatCount(project.buildCount)}</span>],
            ['Created', <time dateTime={project.createdAt}>{formatDate(project.createdAt)}</time>],
          ] as const
        ).map(([label, value]) => (
          <div key={label}>
            <dt className="text-xs text-ink-500">{label}</dt>
            <dd className="mt-0.5 text-ink-900">{value}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}

/**
 * The project's landing page: is main green, each branch's trend, what fails on main and since
 * which build, which checks drift toward a limit, and what awaits the viewer's decision.
 */
export function ProjectOverview({ project }: { project: Project }) {
  const overview = useOverview(project.key);
  const { canApprove } = useProjectAbilities(project.key);

  if (overview.isPending) return <OverviewSkeleton />;
  if (overview.isError) return <ErrorState error={overview.error} onRetry={() => void overview.refetch()} />;
  const data = overview.data;
  return (
    <div className="space-y-4">
      <MainVerdict projectKey={project.key} overview={data} />
      <div className="grid gap-4 lg:grid-cols-2">
        <FailingNow projectKey={project.key} mainBranch={data.mainBranch} failing={data.failing} />
        <BranchTrends projectKey={project.key} branches={data.branches} />
      </div>
      {data.drifting.length > 0 ? (
        <DriftNotice drift={data.drifting} />
      ) : (
        <section aria-label="Drift" className="rounded-lg border border-line bg-paper-raised px-5 py-4">
          <h2 className="text-sm font-semibold text-ink-950">Drifting toward a limit</h2>
          <p className="mt-1 text-sm text-ink-600">No passing check on {data.mainBranch} lost more margin than the project's drift threshold.</p>
        </section>
      )}
      <AwaitingYou projectKey={project.key} items={data.awaiting} mayDecide={canApprove} />
      <AboutProject project={project} />
    </div>
  );
}
