import type { BuildMatrix, BuildSummary } from '@earmark/contracts';
import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { ProgressBar } from '@/components/progress-bar';
import { RelativeTime } from '@/components/relative-time';
import { ShortSha } from '@/components/short-sha';
import { VerdictBadge } from '@/components/verdict-badge';
import { formatCount } from '@/lib/format';
import { paths } from '@/lib/paths';
import { shortSha } from '@/lib/sha';
import { isBuildInProgress } from '../api/get-build-matrix';
import { VerdictCounts } from './verdict-counts';

function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="min-w-0">
      <dt className="text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">{label}</dt>
      <dd className="mt-1 text-sm text-ink-900">{children}</dd>
    </div>
  );
}

/** Judged / total captures while the build is still being analysed. */
function AnalysisProgress({ build }: { build: BuildSummary }) {
  const { pass, fail, error, pending } = build.counts;
  const judged = pass + fail + error;
  const total = Math.max(build.captureCount, judged + pending);
  return (
    <div className="rounded-md border border-brass-200 bg-brass-50 px-4 py-3">
      <p className="flex items-center justify-between gap-3 text-sm text-ink-800">
        <span>
          <span className="font-mono tabular-nums">{formatCount(judged)}</span> of{' '}
          <span className="font-mono tabular-nums">{formatCount(total)}</span> captures judged
        </span>
        <span className="text-xs text-ink-500">Updates every few seconds</span>
      </p>
      <ProgressBar value={judged} max={total} label={`${judged} of ${total} captures judged`} className="mt-2" />
    </div>
  );
}

/** The build's facts, its analysis progress and which build it is compared with. */
export function BuildSummaryPanel({ projectKey, matrix }: { projectKey: string; matrix: BuildMatrix }) {
  const { build, compared } = matrix;
  return (
    <section aria-label="Build summary" className="space-y-4 rounded-lg border border-line bg-paper-raised px-5 py-4">
      <dl className="grid grid-cols-2 gap-x-8 gap-y-4 sm:grid-cols-3 lg:grid-cols-5">
        <Fact label="Commit">
          <ShortSha sha={build.sha} />
        </Fact>
        <Fact label="Branch">
          {build.branch ? <span className="font-mono text-[13px]">{build.branch}</span> : <span className="text-ink-400">—</span>}
        </Fact>
        <Fact label="Created">
          <RelativeTime iso={build.createdAt} />
        </Fact>
        <Fact label="Status">
          <VerdictBadge verdict={build.status} />
        </Fact>
        <Fact label="Captures">
          <VerdictCounts counts={build.counts} />
        </Fact>
      </dl>
      {isBuildInProgress(matrix) ? <AnalysisProgress build={build} /> : null}
      <p className="border-t border-line pt-3 text-sm text-ink-700">
        {compared ? (
          <>
            Compared with{' '}
            <Link to={paths.build(projectKey, compared.sha)} className="font-mono text-[13px] font-medium text-ink-950 underline underline-offset-4">
              {shortSha(compared.sha)}
            </Link>
            {compared.branch ? (
              <>
                {' '}
                on <span className="font-mono text-[13px]">{compared.branch}</span>
              </>
            ) : null}
            {compared.label ? <> ({compared.label})</> : null}, <RelativeTime iso={compared.createdAt} />. Cells marked
            “was …” changed since then.
          </>
        ) : (
          'No earlier build to compare with: this is the first build of its branch and project.'
        )}
      </p>
    </section>
  );
}
