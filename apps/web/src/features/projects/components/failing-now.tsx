import { findingCheckName, formatMarginAt, type FailingCheck } from '@earmark/contracts';
import { Link } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { ShortSha } from '@/components/short-sha';
import { paths } from '@/lib/paths';

/** What fails on main now, each check with the build its failing streak began ("since"), longest-failing first. */
export function FailingNow({ projectKey, mainBranch, failing }: { projectKey: string; mainBranch: string; failing: FailingCheck[] }) {
  return (
    <section aria-labelledby="failing-now" className="rounded-lg border border-line bg-paper-raised">
      <h2 id="failing-now" className="border-b border-line px-5 py-3 text-sm font-semibold text-ink-950">
        Failing on <span className="font-mono">{mainBranch}</span> now {failing.length > 0 ? <span className="font-mono tabular-nums text-ink-500">({failing.length})</span> : null}
      </h2>
      {failing.length === 0 ? (
        <p className="px-5 py-4 text-sm text-ink-600">No check fails in the newest captures of {mainBranch}.</p>
      ) : (
        <ul className="divide-y divide-line">
          {failing.map((check) => (
            <li
              key={`${check.testCase}/${check.target}/${check.checkId}`}
              data-failing-check={check.checkId}
              className="grid gap-x-4 gap-y-1 px-5 py-3 sm:grid-cols-[minmax(0,1fr)_auto]"
            >
              <div className="min-w-0">
                <Link
                  to={paths.capture(projectKey, check.latest.sha, check.captureId)}
                  className="font-medium text-ink-950 underline-offset-4 hover:underline"
                >
                  {findingCheckName({ checkId: check.checkId, checkKind: check.kind, checkLabel: check.label })}
                </Link>
                <p className="mt-0.5 font-mono text-[11.5px] break-words text-ink-500">
                  {check.testCase} · {check.target}
                </p>
              </div>
              <div className="text-sm sm:text-right">
                <p className="font-mono text-[12.5px] tabular-nums text-fail">
                  {check.margin === null ? 'not measurable' : formatMarginAt(check.margin, check.unit, check.worstHz)}
                </p>
                <p className="flex flex-wrap items-center gap-x-1 text-[12px] text-ink-600 sm:justify-end" data-since={check.since.sha}>
                  failing since <ShortSha sha={check.since.sha} to={paths.build(projectKey, check.since.sha)} />
                  <span>
                    (<RelativeTime iso={check.since.createdAt} />, {check.streak} {check.streak === 1 ? 'build' : 'builds'})
                  </span>
                </p>
              </div>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
