import { formatFrequency, formatSeconds, type CaptureDetail } from '@earmark/contracts';
import { Link } from 'react-router';
import { JudgingSettingsSummary } from '@/components/judging-settings-summary';
import { PageHeader } from '@/components/page-header';
import { Spinner } from '@/components/spinner';
import { VerdictBadge } from '@/components/verdict-badge';
import { WaiverNote } from '@/components/waiver-note';
import { formatDate } from '@/lib/format';
import { paths } from '@/lib/paths';
import { isCaptureInProgress } from '../api/get-capture';
import { ReevaluationChanges } from './reevaluation-changes';

function Meta({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div className="min-w-0">
      <dt className="text-[11px] font-semibold uppercase tracking-[0.06em] text-ink-500">{label}</dt>
      <dd className="mt-0.5 truncate text-sm text-ink-900">{children}</dd>
    </div>
  );
}

/** Capture page header: what was tested, on which build and target, and what the verdict was. */
export function CaptureHeader({ detail }: { detail: CaptureDetail }) {
  const { capture, testCase, target, build } = detail;
  const verdict = capture.verdict;
  const inProgress = isCaptureInProgress(capture.status);
  const seconds = capture.frames / capture.sampleRate;

  return (
    <div className="space-y-4">
      <PageHeader
        eyebrow={
          <span className="flex flex-wrap items-center gap-1.5 normal-case tracking-normal">
            <Link to={paths.projects()} className="font-semibold uppercase tracking-[0.08em] hover:text-ink-900">
              Projects
            </Link>
            <span aria-hidden="true">/</span>
            <Link to={paths.project(capture.projectKey)} className="font-mono font-normal text-ink-600 hover:text-ink-900">
              {capture.projectKey}
            </Link>
            <span aria-hidden="true">/</span>
            <Link to={paths.build(capture.projectKey, build.sha)} className="font-mono font-normal text-ink-600 hover:text-ink-900">
              {build.sha.slice(0, 7)}
            </Link>
            <span aria-hidden="true">/</span>
            <span className="font-semibold uppercase tracking-[0.08em]">Capture</span>
          </span>
        }
        title={testCase.name}
        titleAside={<code className="font-mono text-sm text-ink-500">{testCase.key}</code>}
        actions={
          verdict && !inProgress ? (
            <span className="flex flex-wrap items-center justify-end gap-2">
              <VerdictBadge verdict={verdict.outcome} className="h-7 px-3 text-sm" />
              {verdict.waiver ? <WaiverNote waiver={verdict.waiver} className="text-[13px]" /> : null}
            </span>
          ) : (
            <span className="inline-flex h-7 items-center gap-2 rounded-full border border-line-strong bg-paper-raised px-3 text-sm font-medium text-ink-700">
              {capture.status === 'error' ? 'Not analysed' : <Spinner label="Analysing…" />}
            </span>
          )
        }
      />

      <dl className="grid grid-cols-2 gap-x-8 gap-y-3 sm:grid-cols-4 lg:grid-cols-[repeat(5,auto)] lg:justify-start">
        <Meta label="Target">
          {target.name} <span className="font-mono text-xs text-ink-500">{target.key}</span>
        </Meta>
        <Meta label="Build">
          <Link
            to={paths.build(capture.projectKey, build.sha)}
            className="font-mono text-ink-950 underline decoration-ink-300 underline-offset-4 hover:decoration-ink-800"
            title={build.sha}
          >
            {build.sha.slice(0, 10)}
          </Link>
          {build.branch ? <span className="ml-2 text-xs text-ink-500">{build.branch}</span> : null}
        </Meta>
        <Meta label="Capture">
          <span className="font-mono text-[13px] tabular-nums">
            {capture.channels} ch · {formatFrequency(capture.sampleRate)} · {formatSeconds(seconds)}
          </span>
        </Meta>
        <Meta label="Stimulus">
          <span className="font-mono text-[13px]">{testCase.stimulusKind}</span>
        </Meta>
        <Meta label="Uploaded">
          <time dateTime={capture.createdAt}>{formatDate(capture.createdAt)}</time>
        </Meta>
      </dl>

      {verdict && !inProgress ? (
        <p className="text-xs text-ink-600">
          Judged by engine <span className="font-mono text-ink-900">{verdict.engineVersion}</span>
          {verdict.maskRevision !== null ? (
            <>
              {' '}
              against mask rev <span className="font-mono text-ink-900">{verdict.maskRevision}</span>
            </>
          ) : (
            ' with no mask in force'
          )}
          {verdict.previousOutcome ? (
            <>
              {' '}
              (re-evaluated; it was <span className="font-medium text-ink-900">{verdict.previousOutcome}</span> before)
            </>
          ) : null}
          {detail.lastPassing ? (
            <>
              {' '}
              · last passed on build{' '}
              <Link
                to={paths.build(capture.projectKey, detail.lastPassing.buildSha)}
                className="font-mono text-ink-900 underline decoration-ink-300 underline-offset-4 hover:decoration-ink-800"
              >
                {detail.lastPassing.buildSha.slice(0, 7)}
              </Link>{' '}
              ({formatDate(detail.lastPassing.createdAt)})
            </>
          ) : null}
        </p>
      ) : null}

      {verdict && !inProgress ? (
        verdict.settings ? (
          <JudgingSettingsSummary settings={verdict.settings} label="Settings this verdict used" />
        ) : (
          <p className="text-xs text-ink-500">This verdict was recorded before verdicts kept the settings they used.</p>
        )
      ) : null}

      {verdict && !inProgress ? <ReevaluationChanges verdict={verdict} /> : null}

      {verdict?.outcome === 'error' && verdict.reason ? (
        <div role="note" aria-label="Why the analysis could not decide" className="flex items-start gap-3 rounded-md border border-error/30 bg-error-soft px-4 py-3">
          <svg viewBox="0 0 12 12" aria-hidden="true" className="mt-0.5 size-4 shrink-0 text-error">
            <path d="M6 0.3 11.7 6 6 11.7 0.3 6Z" fill="currentColor" />
            <path d="M6 3.3v3.3" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
            <circle cx="6" cy="8.6" r="0.85" fill="white" />
          </svg>
          <div className="text-sm">
            <p className="font-semibold text-ink-950">The analysis could not decide</p>
            <p className="mt-0.5 text-ink-700">{verdict.reason}</p>
          </div>
        </div>
      ) : null}
      {verdict?.outcome === 'fail' && verdict.reason ? (
        <p className="flex items-start gap-2 text-sm text-ink-700">
          <svg viewBox="0 0 12 12" aria-hidden="true" className="mt-1 size-3 shrink-0 text-fail">
            <rect x="0.5" y="0.5" width="11" height="11" rx="1.5" fill="currentColor" />
            <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
          </svg>
          <span>{verdict.reason}</span>
        </p>
      ) : null}
    </div>
  );
}

/** Shown while the worker analyses the capture; the page polls and replaces it with the results. */
export function AnalysisProgress({ status }: { status: 'queued' | 'analysing' }) {
  return (
    <div role="status" className="rounded-lg border border-line bg-paper-raised px-5 py-4">
      <div className="flex items-center justify-between gap-4 text-sm">
        <span className="font-medium text-ink-900">{status === 'queued' ? 'Waiting for an analysis worker…' : 'Analysing…'}</span>
        <span className="text-xs text-ink-500">This page updates by itself.</span>
      </div>
      <div
        role="progressbar"
        aria-label="Analysis progress"
        aria-valuetext={status === 'queued' ? 'Queued' : 'Analysing…'}
        className="mt-3 h-1 overflow-hidden rounded-full bg-brass-100"
      >
        <div className="h-full w-1/3 animate-[earmark-progress_1.1s_ease-in-out_infinite] rounded-full bg-brass-500" />
      </div>
    </div>
  );
}

/** A capture whose analysis ended without a verdict (status error). */
export function AnalysisFailed() {
  return (
    <div role="alert" className="flex items-start gap-4 rounded-lg border border-line bg-paper-raised px-6 py-6">
      <svg viewBox="0 0 20 20" aria-hidden="true" className="mt-0.5 size-5 shrink-0 text-error">
        <path d="M10 1 19 10 10 19 1 10Z" fill="currentColor" />
        <path d="M10 5.8v5" stroke="white" strokeWidth="1.8" strokeLinecap="round" />
        <circle cx="10" cy="14" r="1.1" fill="white" />
      </svg>
      <div>
        <h2 className="text-base font-semibold text-ink-950">No verdict for this capture</h2>
        <p className="mt-1 text-sm text-ink-600">
          The capture is stored, but its analysis ended with an error before a verdict was reached, so there is nothing to plot.
          Listening still works, and engineers can judge the stored capture anew with Analyse again.
        </p>
      </div>
    </div>
  );
}
