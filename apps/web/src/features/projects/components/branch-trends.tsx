import type { BranchTrend } from '@earmark/contracts';
import { Link } from 'react-router';
import { VerdictBadge, VerdictIcon, verdictLabels } from '@/components/verdict-badge';
import { RelativeTime } from '@/components/relative-time';
import { paths } from '@/lib/paths';
import { shortSha } from '@/lib/sha';

/** One row per branch: its newest verdict and its last builds as small marks, oldest left, each a link to its build. */
export function BranchTrends({ projectKey, branches }: { projectKey: string; branches: BranchTrend[] }) {
  return (
    <section aria-labelledby="branch-trends" className="rounded-lg border border-line bg-paper-raised">
      <h2 id="branch-trends" className="border-b border-line px-5 py-3 text-sm font-semibold text-ink-950">
        Branches
      </h2>
      {branches.length === 0 ? (
        <p className="px-5 py-4 text-sm text-ink-600">No build names a branch yet.</p>
      ) : (
        <ul className="divide-y divide-line">
          {branches.map((trend) => (
            <li key={trend.branch} data-branch={trend.branch} className="flex flex-wrap items-center gap-x-4 gap-y-2 px-5 py-3">
              <div className="min-w-0 flex-1 basis-44">
                <Link
                  to={paths.builds(projectKey, new URLSearchParams({ branch: trend.branch }).toString())}
                  className="block truncate font-mono text-[13px] text-ink-950 underline-offset-4 hover:underline"
                >
                  {trend.branch}
                </Link>
                <p className="text-[11.5px] text-ink-500">
                  {trend.builds} {trend.builds === 1 ? 'build' : 'builds'} · newest <RelativeTime iso={trend.latest.createdAt} />
                </p>
              </div>
              <ol aria-label={`Last ${trend.marks.length} builds of ${trend.branch}, oldest first`} className="flex flex-wrap items-center gap-1">
                {trend.marks.map((mark) => (
                  <li key={mark.sha}>
                    <Link
                      to={paths.build(projectKey, mark.sha)}
                      data-trend-mark={mark.status}
                      title={`${shortSha(mark.sha)}: ${verdictLabels[mark.status]}`}
                      aria-label={`Build ${shortSha(mark.sha)}: ${verdictLabels[mark.status]}`}
                      className="grid size-6 place-items-center rounded hover:bg-ink-900/5"
                    >
                      <VerdictIcon verdict={mark.status} />
                    </Link>
                  </li>
                ))}
              </ol>
              <VerdictBadge verdict={trend.latest.status} />
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
