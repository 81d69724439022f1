import type { FieldIssues } from '@/lib/field-issues';
import { cn } from '@/lib/cn';
import type { BandRow, PointRow } from '../utils/editor-checks';
import { IssueText, SmallButton } from './editor-parts';

const cell =
  'h-8 w-full rounded border border-line-strong bg-white px-2 text-right font-mono text-[13px] tabular-nums text-ink-950 focus:border-ink-700 focus:outline-none focus:ring-3 focus:ring-brass-300/50 aria-invalid:border-fail';

/** One limit curve as an editable table of breakpoints (Hz, dB), with its own schema messages. */
export function LimitCurveTable({
  title,
  rows,
  path,
  issues,
  readOnly,
  onChange,
}: {
  title: string;
  rows: PointRow[];
  /** Schema path of the curve, e.g. `checks.0.upper`. */
  path: string;
  issues: FieldIssues;
  readOnly: boolean;
  onChange: (rows: PointRow[]) => void;
}) {
  const set = (index: number, patch: Partial<PointRow>) => onChange(rows.map((row, i) => (i === index ? { ...row, ...patch } : row)));
  const curveIssues = issues[path] ?? [];
  return (
    <div className="min-w-0">
      <table aria-label={title} className="w-full border-collapse text-sm">
        <caption className="mb-1 text-left text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">{title}</caption>
        <thead>
          <tr className="text-left text-[11px] text-ink-500">
            <th scope="col" className="w-8 font-normal">#</th>
            <th scope="col" className="px-1 text-right font-normal">Hz</th>
            <th scope="col" className="px-1 text-right font-normal">dB</th>
            {readOnly ? null : <th scope="col" className="relative"><span className="sr-only">Remove</span></th>}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => {
            const hzIssues = issues[`${path}.${i}.hz`] ?? [];
            const dbIssues = issues[`${path}.${i}.db`] ?? [];
            const rowIssues = issues[`${path}.${i}`] ?? [];
            return (
              <tr key={i} className="align-top">
                <td className="py-0.5 font-mono text-xs leading-8 text-ink-400">{i + 1}</td>
                <td className="px-1 py-0.5">
                  <input
                    aria-label={`${title} point ${i + 1} frequency (Hz)`}
                    aria-invalid={hzIssues.length ? true : undefined}
                    readOnly={readOnly}
                    inputMode="decimal"
                    className={cn(cell, readOnly && 'border-transparent bg-transparent')}
                    value={row.hz}
                    onChange={(e) => set(i, { hz: e.target.value })}
                  />
                  <IssueText path={`${path}.${i}.hz`} messages={[...hzIssues, ...rowIssues]} />
                </td>
                <td className="px-1 py-0.5">
                  <input
                    aria-label={`${title} point ${i + 1} level (dB)`}
                    aria-invalid={dbIssues.length ? true : undefined}
                    readOnly={readOnly}
                    inputMode="decimal"
                    className={cn(cell, readOnly && 'border-transparent bg-transparent')}
                    value={row.db}
                    onChange={(e) => set(i, { db: e.target.value })}
                  />
                  <IssueText path={`${path}.${i}.db`} messages={dbIssues} />
                </td>
                {readOnly ? null : (
                  <td className="py-0.5">
                    <SmallButton label={`Remove ${title.toLowerCase()} point ${i + 1}`} onClick={() => onChange(rows.filter((_, j) => j !== i))}>
                      <path d="m4.5 4.5 7 7m0-7-7 7" />
                    </SmallButton>
                  </td>
                )}
              </tr>
            );
          })}
        </tbody>
      </table>
      <IssueText path={path} messages={curveIssues} />
      {readOnly ? null : (
        <button
          type="button"
          className="mt-1 text-xs font-medium text-ink-700 underline-offset-2 hover:underline"
          onClick={() => {
            const last = rows[rows.length - 1];
            const hz = last ? Math.min(Number(last.hz) * 2 || 1000, 96000) : 1000;
            onChange([...rows, { hz: String(Math.round(hz)), db: last?.db ?? '0' }]);
          }}
        >
          + Add point
        </button>
      )}
    </div>
  );
}

/** Per-band limits of a band-levels check. */
export function BandTable({
  rows,
  path,
  issues,
  readOnly,
  onChange,
}: {
  rows: BandRow[];
  path: string;
  issues: FieldIssues;
  readOnly: boolean;
  onChange: (rows: BandRow[]) => void;
}) {
  const set = (index: number, patch: Partial<BandRow>) => onChange(rows.map((row, i) => (i === index ? { ...row, ...patch } : row)));
  const columns: { key: keyof BandRow; label: string }[] = [
    { key: 'centerHz', label: 'Centre Hz' },
    { key: 'min', label: 'Min dB' },
    { key: 'max', label: 'Max dB' },
  ];
  return (
    <div className="min-w-0 max-w-md">
      <table aria-label="Bands" className="w-full border-collapse text-sm">
        <caption className="mb-1 text-left text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">Bands</caption>
        <thead>
          <tr className="text-left text-[11px] text-ink-500">
            {columns.map((c) => (
              <th key={c.key} scope="col" className="px-1 text-right font-normal">
                {c.label}
              </th>
            ))}
            {readOnly ? null : <th scope="col" className="relative"><span className="sr-only">Remove</span></th>}
          </tr>
        </thead>
        <tbody>
          {rows.map((row, i) => (
            <tr key={i} className="align-top">
              {columns.map((c) => {
                const messages = [...(issues[`${path}.${i}.${c.key}`] ?? []), ...(c.key === 'max' ? (issues[`${path}.${i}`] ?? []) : [])];
                return (
                  <td key={c.key} className="px-1 py-0.5">
                    <input
                      aria-label={`Band ${i + 1} ${c.label}`}
                      aria-invalid={messages.length ? true : undefined}
                      readOnly={readOnly}
                      inputMode="decimal"
                      className={cn(cell, readOnly && 'border-transparent bg-transparent')}
                      value={row[c.key]}
                      onChange={(e) => set(i, { [c.key]: e.target.value })}
                    />
                    <IssueText path={`${path}.${i}.${c.key}`} messages={messages} />
                  </td>
                );
              })}
              {readOnly ? null : (
                <td className="py-0.5">
                  <SmallButton label={`Remove band ${i + 1}`} onClick={() => onChange(rows.filter((_, j) => j !== i))}>
                    <path d="m4.5 4.5 7 7m0-7-7 7" />
                  </SmallButton>
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <IssueText path={path} messages={issues[path] ?? []} />
      {readOnly ? null : (
        <button type="button" className="mt-1 text-xs font-medium text-ink-700 underline-offset-2 hover:underline" onClick={() => onChange([...rows, { centerHz: '', min: '', max: '' }])}>
          + Add band
        </button>
      )}
    </div>
  );
}
