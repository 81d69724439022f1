import type { BuildMatrix as Matrix, CellOutcome, MatrixCell } from '@earmark/contracts';
import { useState } from 'react';
import { Link } from 'react-router';
import { VerdictIcon, verdictLabels } from '@/components/verdict-badge';
import { WaiverNote } from '@/components/waiver-note';
import { cn } from '@/lib/cn';
import { describeCheck } from '@/lib/format-measure';
import { paths } from '@/lib/paths';
import { shortSha } from '@/lib/sha';

type View = 'all' | 'failing' | 'changed';

const cellTone: Record<CellOutcome, string> = {
  pass: 'bg-pass-soft/45 hover:bg-pass-soft',
  fail: 'bg-fail-soft/70 hover:bg-fail-soft',
  error: 'bg-error-soft/70 hover:bg-error-soft',
  pending: 'bg-paper-raised hover:bg-ink-50',
};

const outcomeText: Record<CellOutcome, string> = {
  pass: 'text-pass',
  fail: 'text-fail',
  error: 'text-error',
  pending: 'text-ink-600',
};

/** The cell differs from the compared build: a different outcome, or no capture there before. */
export function cellChange(cell: MatrixCell, hasCompared: boolean): 'changed' | 'new' | null {
  if (!hasCompared) return null;
  if (cell.previous === null) return 'new';
  return cell.previous !== cell.outcome ? 'changed' : null;
}

function ChangeMarker({ cell, kind }: { cell: MatrixCell; kind: 'changed' | 'new' }) {
  return (
    <span
      data-changed=""
      className="mt-1.5 inline-flex items-center gap-1 rounded-[4px] border border-dashed border-ink-400 bg-paper-raised px-1 text-[11px] font-medium text-ink-700"
    >
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-2.5">
        <path d="M2 6h7M6.5 3 9.5 6l-3 3" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
      {kind === 'new' ? 'new' : `was ${verdictLabels[cell.previous ?? 'pending'].toLowerCase()}`}
    </span>
  );
}

function Cell({
  projectKey,
  sha,
  cell,
  testCase,
  target,
  hasCompared,
}: {
  projectKey: string;
  sha: string;
  cell: MatrixCell | undefined;
  testCase: { key: string; name: string };
  target: { key: string; name: string };
  hasCompared: boolean;
}) {
  if (!cell) {
    return (
      <td data-testcase={testCase.key} data-target={target.key} className="border-l border-line px-3 py-2.5 align-top text-xs text-ink-400">
        No capture
      </td>
    );
  }
  // A waived check no longer fails the cell: it is told by the waiver note instead.
  const failing = cell.failing.filter((check) => !check.waiver);
  // An error cell with its reason says it in words; the unevaluated check has no margin to show.
  const worst = cell.outcome === 'error' && cell.reason ? undefined : failing[0];
  const change = cellChange(cell, hasCompared);
  return (
    <td
      data-testcase={testCase.key}
      data-target={target.key}
      data-outcome={cell.outcome}
      className={cn('border-l border-line p-0 align-top transition-colors', cellTone[cell.outcome])}
    >
      <Link
        to={paths.capture(projectKey, sha, cell.captureId)}
        className="block h-full min-h-16 px-3 py-2.5 focus-visible:-outline-offset-2"
      >
        <span className="sr-only">
          {testCase.name} on {target.name}:{' '}
        </span>
        <span className={cn('flex items-center gap-1.5 text-[13px] font-semibold', outcomeText[cell.outcome])}>
          <VerdictIcon verdict={cell.outcome} />
          {verdictLabels[cell.outcome]}
        </span>
        {cell.waiver ? <WaiverNote waiver={cell.waiver} className="mt-1 text-[11.5px]" /> : null}
        {cell.outcome === 'error' && cell.reason ? (
          <span data-testid="error-reason" className="mt-1 line-clamp-3 block max-w-[22rem] text-[11.5px] leading-snug text-ink-800" title={cell.reason}>
            {cell.reason}
          </span>
        ) : null}
        {worst ? (
          <span className="mt-1 block font-mono text-[11.5px] leading-snug text-ink-800" title={describeCheck(worst)}>
            {describeCheck(worst)}
          </span>
        ) : null}
        {failing.length > 1 ? (
          <span className="block text-[11px] text-ink-500">
            +{failing.length - 1} more failing check{failing.length > 2 ? 's' : ''}
          </span>
        ) : null}
        {change ? <ChangeMarker cell={cell} kind={change} /> : null}
      </Link>
    </td>
  );
}

/**
 * Test case × target: each cell is the newest capture of that pair in this build, linked to
 * its capture page, with the worst failing check, "passed with waiver, until <date>" where a
 * waiver counts it as passed, and a marker where it differs from the compared build.
 */
export function BuildMatrix({ projectKey, matrix }: { projectKey: string; matrix: Matrix }) {
  const [view, setView] = useState<View>('all');
  const hasCompared = matrix.compared !== null;
  const byKey = new Map(matrix.cells.map((cell) => [`${cell.testCase}\u0000${cell.target}`, cell]));
  const cellOf = (testCase: string, target: string) => byKey.get(`${testCase}\u0000${target}`);
  const changedCount = matrix.cells.filter((cell) => cellChange(cell, hasCompared) === 'changed').length;

  const rows = matrix.testCases.filter((testCase) => {
    if (view === 'all') return true;
    return matrix.targets.some((target) => {
      const cell = cellOf(testCase.key, target.key);
      if (!cell) return false;
      return view === 'failing' ? cell.outcome === 'fail' || cell.outcome === 'error' : cellChange(cell, hasCompared) !== null;
    });
  });

  const views: Array<{ value: View; label: string }> = [
    { value: 'all', label: 'All test cases' },
    { value: 'failing', label: 'Failing or error' },
    { value: 'changed', label: `Changed (${changedCount})` },
  ];

  return (
    <section aria-labelledby="build-matrix-heading" className="space-y-3">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 id="build-matrix-heading" className="text-base font-semibold text-ink-950">
            Test cases × targets
          </h2>
          <p className="text-sm text-ink-600">
            {matrix.testCases.length} test case{matrix.testCases.length === 1 ? '' : 's'} on {matrix.targets.length} target
            {matrix.targets.length === 1 ? '' : 's'}. Open a cell for its spectrum, checks and audio.
          </p>
        </div>
        <div role="group" aria-label="Show" className="inline-flex rounded-md border border-line-strong bg-paper-raised p-0.5">
          {views.map((option) => (
            <button
              key={option.value}
              type="button"
              aria-pressed={view === option.value}
              onClick={() => setView(option.value)}
              className={cn(
                'h-7 rounded-[5px] px-2.5 text-xs font-medium',
                view === option.value ? 'bg-ink-900 text-paper' : 'text-ink-700 hover:bg-ink-900/5',
              )}
            >
              {option.label}
            </button>
          ))}
        </div>
      </div>
      <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised">
        <table aria-label="Build matrix" className="w-full border-collapse text-sm">
          <thead>
            <tr className="border-b border-line">
              <th scope="col" className="sticky left-0 z-10 h-11 min-w-[220px] bg-paper-raised px-4 text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
                Test case
              </th>
              {matrix.targets.map((target) => (
                <th key={target.key} scope="col" className="min-w-[176px] border-l border-line px-3 py-2 text-left align-bottom">
                  <span className="block text-[13px] font-semibold text-ink-900">{target.name}</span>
                  <span className="block font-mono text-[11px] font-normal text-ink-500">{target.key}</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((testCase) => (
              <tr key={testCase.key} className="border-b border-line last:border-b-0">
                <th scope="row" className="sticky left-0 z-10 bg-paper-raised px-4 py-2.5 text-left align-top font-normal">
                  <span className="block text-[13px] font-medium text-ink-900">{testCase.name}</span>
                  <span className="block font-mono text-[11px] text-ink-500">{testCase.key}</span>
                </th>
                {matrix.targets.map((target) => (
                  <Cell
                    key={target.key}
                    projectKey={projectKey}
                    sha={matrix.build.sha}
                    cell={cellOf(testCase.key, target.key)}
                    testCase={testCase}
                    target={target}
                    hasCompared={hasCompared}
                  />
                ))}
              </tr>
            ))}
            {rows.length === 0 ? (
              <tr>
                <td colSpan={matrix.targets.length + 1} className="px-4 py-8 text-center text-sm text-ink-500">
                  {view === 'failing' ? 'Nothing failed in this build.' : `Nothing changed since ${matrix.compared ? shortSha(matrix.compared.sha) : 'the compared build'}.`}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
    </section>
  );
}
