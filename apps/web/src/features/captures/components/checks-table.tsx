import type { CheckResultDto } from '@earmark/contracts';
import { useMemo, useState } from 'react';
import { VerdictBadge } from '@/components/verdict-badge';
import { WaiverNote } from '@/components/waiver-note';
import { cn } from '@/lib/cn';
import { checkKindLabel, formatMargin, formatValue, isSpectralCheck } from '../utils/check-format';
import { defaultCheckSort, sortChecks, type CheckSort, type CheckSortKey } from '../utils/check-order';
import { formatHz } from '@/lib/plot/log-frequency';
import { PanelCard } from './panel-card';

type Column = { key: CheckSortKey | null; label: string; numeric?: boolean };

const columns: Column[] = [
  { key: 'status', label: 'Result' },
  { key: 'id', label: 'Check' },
  { key: null, label: 'Measured', numeric: true },
  { key: null, label: 'Limit', numeric: true },
  { key: 'margin', label: 'Margin', numeric: true },
  { key: 'worstHz', label: 'Worst at', numeric: true },
];

function SortGlyph({ direction }: { direction: false | 'asc' | 'desc' }) {
  return (
    <svg viewBox="0 0 8 12" aria-hidden="true" className="h-3 w-2">
      <path d="M4 1 7 4.5H1Z" fill="currentColor" opacity={direction === 'asc' ? 1 : 0.25} />
      <path d="M4 11 1 7.5h6Z" fill="currentColor" opacity={direction === 'desc' ? 1 : 0.25} />
    </svg>
  );
}

function WorstCell({ check, onShowFrequency }: { check: CheckResultDto; onShowFrequency?: (hz: number) => void }) {
  if (check.worstHz === null) return <span className="text-ink-400">—</span>;
  const text = formatHz(check.worstHz);
  if (!onShowFrequency || !isSpectralCheck(check)) return <span>{text}</span>;
  return (
    <button
      type="button"
      onClick={() => onShowFrequency(check.worstHz as number)}
      aria-label={`Show ${text} on the spectrum`}
      title="Zoom the spectrum to this frequency"
      className="inline-flex items-center gap-1.5 rounded px-1 py-0.5 font-mono text-ink-900 underline decoration-ink-300 decoration-dotted underline-offset-4 hover:bg-brass-50 hover:decoration-ink-700"
    >
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 text-ink-500">
        <circle cx="6" cy="6" r="3.8" fill="none" stroke="currentColor" strokeWidth="1.2" />
        <path d="M6 0.5v2.4M6 9.1v2.4M0.5 6h2.4M9.1 6h2.4" stroke="currentColor" strokeWidth="1.2" />
      </svg>
      {text}
    </button>
  );
}

/** Every check of the verdict, failing first; a spectral check's worst frequency zooms the spectrum to it. */
export function ChecksTable({ checks, onShowFrequency }: { checks: readonly CheckResultDto[]; onShowFrequency?: (hz: number) => void }) {
  const [sort, setSort] = useState<CheckSort>(defaultCheckSort);
  const rows = useMemo(() => sortChecks(checks, sort), [checks, sort]);
  const failing = checks.filter((c) => !c.pass).length;
  const waived = checks.filter((c) => !c.pass && c.waiver).length;

  const toggle = (key: CheckSortKey) =>
    setSort((current) => (current.key === key ? { key, direction: current.direction === 'asc' ? 'desc' : 'asc' } : { key, direction: 'asc' }));

  return (
    <PanelCard
      title="Checks"
      aside={
        checks.length > 0 ? (
          <span className="text-xs text-ink-600">
            <span className="font-mono tabular-nums">{failing}</span> of <span className="font-mono tabular-nums">{checks.length}</span> failed
            {waived ? (
              <>
                {' '}
                (<span className="font-mono tabular-nums">{waived}</span> waived)
              </>
            ) : null}
          </span>
        ) : null
      }
    >
      {checks.length === 0 ? (
        <p className="py-6 text-center text-sm text-ink-600">No checks were evaluated for this capture yet.</p>
      ) : (
        // relative: the sr-only text in the cells is positioned, and must scroll (and clip) with the table, not widen the page.
        <div className="relative -mx-4 -my-4 overflow-x-auto">
          <table aria-label="Checks" className="w-full min-w-[640px] border-collapse text-sm">
            <thead>
              <tr className="border-b border-line">
                {columns.map((column) => {
                  const active = column.key !== null && sort.key === column.key ? sort.direction : false;
                  return (
                    <th
                      key={column.label}
                      scope="col"
                      aria-sort={active === 'asc' ? 'ascending' : active === 'desc' ? 'descending' : undefined}
                      className={cn(
                        'h-9 px-3 text-[11px] font-semibold whitespace-nowrap uppercase tracking-[0.06em] text-ink-500 first:pl-4 last:pr-4',
                        column.numeric ? 'text-right' : 'text-left',
                      )}
                    >
                      {column.key ? (
                        <button
                          type="button"
                          onClick={() => toggle(column.key as CheckSortKey)}
                          className={cn('inline-flex items-center gap-1.5 rounded uppercase hover:text-ink-900', column.numeric && 'flex-row-reverse', active && 'text-ink-900')}
                        >
                          {column.label}
                          <SortGlyph direction={active} />
                        </button>
                      ) : (
                        column.label
                      )}
                    </th>
                  );
                })}
              </tr>
            </thead>
            <tbody>
              {rows.map((check) => (
                <tr
                  key={check.id}
                  data-check-id={check.id}
                  className={cn(
                    'border-b border-line last:border-b-0',
                    check.pass || check.waiver ? 'hover:bg-brass-50/50' : 'bg-fail-soft/35 hover:bg-fail-soft/60',
                  )}
                >
                  <td className="py-2.5 pr-3 pl-4 align-top">
                    <VerdictBadge verdict={check.pass ? 'pass' : 'fail'} />
                    {!check.pass && check.waiver ? <WaiverNote waiver={check.waiver} kind="check" className="mt-1 flex whitespace-nowrap" /> : null}
                  </td>
                  <td className="min-w-[220px] px-3 py-2.5 align-top">
                    <span className="font-mono text-[12.5px] whitespace-nowrap text-ink-950">{check.id}</span>
                    <span className="mt-0.5 block text-xs text-ink-500">
                      <span className="text-ink-700">{checkKindLabel(check.kind)}</span>
                      {check.label ? ` · ${check.label}` : null}
                    </span>
                    {check.error ? <span className="mt-1 block max-w-[420px] text-xs text-error">Could not be evaluated: {check.error}</span> : null}
                    {check.warnings?.length ? (
                      <ul aria-label={`Warnings for ${check.id}`} className="mt-1 max-w-[420px] space-y-0.5 text-xs text-brass-800">
                        {check.warnings.map((w) => (
                          <li key={w} className="flex gap-1.5">
                            <span aria-hidden="true">⚠</span>
                            <span className="break-words">{w}</span>
                          </li>
                        ))}
                      </ul>
                    ) : null}
                  </td>
                  <td className="px-3 py-2.5 text-right align-top font-mono whitespace-nowrap tabular-nums text-ink-800">
                    {formatValue(check.measured, check.unit)}
                  </td>
                  <td className="px-3 py-2.5 text-right align-top font-mono whitespace-nowrap tabular-nums text-ink-600">
                    {formatValue(check.limit, check.unit)}
                  </td>
                  <td
                    className={cn(
                      'px-3 py-2.5 text-right align-top font-mono whitespace-nowrap tabular-nums',
                      check.margin !== null && check.margin < 0 ? 'font-semibold text-fail' : 'text-ink-800',
                    )}
                  >
                    {formatMargin(check.margin, check.unit)}
                    {check.margin !== null && check.margin < 0 ? <span className="sr-only"> (outside the limit)</span> : null}
                  </td>
                  <td className="py-2.5 pr-4 pl-3 text-right align-top whitespace-nowrap font-mono text-ink-700">
                    <WorstCell check={check} onShowFrequency={onShowFrequency} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </PanelCard>
  );
}
