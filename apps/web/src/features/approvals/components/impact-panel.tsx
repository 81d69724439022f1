import { formatMargin, type ImpactResult, type VerdictFlip } from '@earmark/contracts';
import { useId, useState } from 'react';
import { Button } from '@/components/button';
import { ErrorState } from '@/components/error-state';
import { TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { ProgressBar } from '@/components/progress-bar';
import { Skeleton } from '@/components/skeleton';
import { VerdictBadge } from '@/components/verdict-badge';
import { shortSha } from '@/lib/sha';
import { unfinished, useImpactRun, useLatestImpactRun, useStartImpactRun } from '../api/impact-runs';

function FlipText({ flip }: { flip: VerdictFlip | null }) {
  if (flip === null) return <span className="text-ink-400">no change</span>;
  return (
    <span className="inline-flex items-center gap-1 font-medium text-ink-900">
      <span aria-hidden="true" className="font-mono">{flip === 'pass-to-fail' ? '↓' : '↑'}</span>
      {flip === 'pass-to-fail' ? 'would now fail' : 'would now pass'}
    </span>
  );
}

function margin(value: number | null, unit: string | null): string {
  return formatMargin(value, unit);
}

function ImpactTables({ result, revision }: { result: ImpactResult; revision: number }) {
  const { summary } = result;
  return (
    <div className="space-y-3">
      <p className="text-sm text-ink-700">
        <span className="font-mono tabular-nums">{summary.builds}</span> builds, <span className="font-mono tabular-nums">{summary.captures}</span> captures:{' '}
        <span className="font-mono tabular-nums font-semibold">{summary.passToFail}</span> builds would newly fail,{' '}
        <span className="font-mono tabular-nums font-semibold">{summary.failToPass}</span> would newly pass.
      </p>
      <div className="overflow-x-auto">
        <table aria-label={`Impact of revision ${revision} per build`} className="w-full min-w-[560px] border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-[11px] font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-8 pr-3">Build</th>
              <th scope="col" className="pr-3">Now</th>
              <th scope="col" className="pr-3">Under revision</th>
              <th scope="col" className="pr-3">Change</th>
              <th scope="col">Checks that flip</th>
            </tr>
          </thead>
          <tbody>
            {result.builds.map((build) => {
              const flipped = build.checks.filter((c) => c.flip !== null);
              return (
                <tr key={build.sha} className="border-b border-line align-top last:border-b-0">
                  <td className="py-2 pr-3">
                    <span className="font-mono text-[13px]">{shortSha(build.sha)}</span>
                    {build.branch ? <span className="ml-1.5 text-xs text-ink-500">{build.branch}</span> : null}
                  </td>
                  <td className="py-2 pr-3">{build.current ? <VerdictBadge verdict={build.current} /> : <span className="text-ink-400">—</span>}</td>
                  <td className="py-2 pr-3">
                    <VerdictBadge verdict={build.draft} />
                  </td>
                  <td className="py-2 pr-3">
                    <FlipText flip={build.flip} />
                  </td>
                  <td className="py-2 font-mono text-xs text-ink-700">
                    {flipped.length
                      ? flipped.map((c) => `${c.checkId} ${c.flip === 'pass-to-fail' ? '↓' : '↑'} ${margin(c.draft?.margin ?? null, c.unit)}`).join(', ')
                      : '—'}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {summary.worst.length ? (
        <div className="overflow-x-auto">
        <table aria-label={`Worst margins of revision ${revision}`} className="w-full max-w-xl border-collapse text-sm">
          <thead>
            <tr className="border-b border-line text-left text-[11px] font-semibold uppercase tracking-[0.06em] text-ink-500">
              <th scope="col" className="h-8 pr-3">Check</th>
              <th scope="col" className="pr-3 text-right">Worst margin now</th>
              <th scope="col" className="text-right">Under revision</th>
            </tr>
          </thead>
          <tbody>
            {summary.worst.map((w) => (
              <tr key={w.checkId} className="border-b border-line last:border-b-0">
                <td className="py-1.5 pr-3 font-mono text-[13px]">{w.checkId}</td>
                <td className="py-1.5 pr-3 text-right font-mono tabular-nums">{margin(w.current, w.unit)}</td>
                <td className={`py-1.5 text-right font-mono tabular-nums ${w.draft !== null && w.draft < 0 ? 'font-semibold text-fail' : ''}`}>{margin(w.draft, w.unit)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        </div>
      ) : null}
    </div>
  );
}

/** What a revision would change on the last N builds: start a run, follow its progress, read the flips. */
export function ImpactPanel({ projectKey, caseKey, revision, canRun }: { projectKey: string; caseKey: string; revision: number; canRun: boolean }) {
  const latest = useLatestImpactRun(projectKey, caseKey, revision);
  const start = useStartImpactRun(projectKey, caseKey, revision);
  const current = start.data ?? latest.data ?? null;
  const run = useImpactRun(projectKey, caseKey, revision, current?.id ?? null, current);
  const [builds, setBuilds] = useState('20');
  const buildsId = useId();
  const shown = run.data ?? current;
  const running = unfinished(shown);

  return (
    <section aria-label={`Impact of revision ${revision}`} className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <h3 className="text-sm font-semibold text-ink-950">Impact on past builds</h3>
        {canRun ? (
          <div className="flex items-end gap-2">
            <label htmlFor={buildsId} className="text-xs text-ink-600">
              Last
              <TextInput id={buildsId} inputMode="numeric" value={builds} onChange={(e) => setBuilds(e.target.value)} className="mx-1.5 inline-block h-8 w-16 text-right font-mono" />
              builds
            </label>
            <Button variant="secondary" className="h-8" busy={start.isPending} disabled={running} onClick={() => start.mutate({ builds: Number(builds) || 20 })}>
              Run impact
            </Button>
          </div>
        ) : null}
      </div>
      {start.error ? <InlineError error={start.error} /> : null}
      {latest.isPending ? (
        <Skeleton className="h-16" />
      ) : latest.isError ? (
        <ErrorState error={latest.error} onRetry={() => void latest.refetch()} />
      ) : !shown ? (
        <p className="rounded-md border border-dashed border-line-strong px-4 py-5 text-center text-sm text-ink-600">
          No impact run yet. Run one to see which recent builds would pass or fail under this revision.
        </p>
      ) : running ? (
        <div className="space-y-1.5">
          <ProgressBar value={shown.progress} max={Math.max(shown.total, 1)} label={`Impact run of revision ${revision}`} />
          <p aria-live="polite" className="font-mono text-xs text-ink-600">
            {shown.state === 'queued' ? 'Queued…' : `Evaluated ${shown.progress} of ${shown.total} captures`}
          </p>
        </div>
      ) : shown.state === 'error' ? (
        <p role="alert" className="rounded-md border border-error/30 bg-error-soft px-3 py-2 text-sm text-ink-900">
          <span className="font-semibold">The impact run failed.</span> {shown.error ?? 'The worker gave no reason.'}
        </p>
      ) : shown.result ? (
        <ImpactTables result={shown.result} revision={revision} />
      ) : null}
      {run.error ? <InlineError error={run.error} /> : null}
    </section>
  );
}
