import type { MaskRevisionDto } from '@earmark/contracts';
import { Link } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { RevisionStateBadge } from '@/components/revision-state-badge';
import { cn } from '@/lib/cn';

/** A test case's revisions, newest first; the selected one is marked and opened below. */
export function RevisionsTable({
  revisions,
  selected,
  hrefFor,
}: {
  revisions: MaskRevisionDto[];
  selected: number | null;
  hrefFor: (revision: number) => string;
}) {
  return (
    <div className="relative overflow-x-auto rounded-lg border border-line bg-paper-raised">
      <table aria-label="Mask revisions" className="w-full min-w-[860px] border-collapse text-sm">
        <thead>
          <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
            <th scope="col" className="h-10 px-4">Revision</th>
            <th scope="col" className="px-4">State</th>
            <th scope="col" className="px-4">Target</th>
            <th scope="col" className="px-4 text-right">Checks</th>
            <th scope="col" className="px-4">Note</th>
            <th scope="col" className="px-4">Author</th>
            <th scope="col" className="px-4">Reviewer</th>
            <th scope="col" className="px-4">Created</th>
            <th scope="col" className="px-4">Decided</th>
          </tr>
        </thead>
        <tbody>
          {revisions.map((r) => {
            const current = r.revision === selected;
            return (
              <tr key={r.id} aria-current={current || undefined} className={cn('border-b border-line last:border-b-0', current ? 'bg-brass-50' : 'hover:bg-paper/60')}>
                <td className={cn('px-4 py-2.5', current && 'shadow-[inset_3px_0_0_var(--color-brass-400)]')}>
                  <Link to={hrefFor(r.revision)} className="font-mono text-[13px] font-medium text-ink-950 underline-offset-2 hover:underline">
                    Revision {r.revision}
                  </Link>
                </td>
                <td className="px-4 py-2.5">
                  <RevisionStateBadge state={r.state} />
                </td>
                <td className="px-4 py-2.5 font-mono text-xs text-ink-700">{r.target ?? 'all targets'}</td>
                <td className="px-4 py-2.5 text-right font-mono tabular-nums">{r.checks.length}</td>
                <td className="max-w-56 truncate px-4 py-2.5 text-ink-700" title={r.note}>
                  {r.note || <span className="text-ink-400">—</span>}
                </td>
                <td className="px-4 py-2.5 text-ink-700">{r.author}</td>
                <td className="px-4 py-2.5 text-ink-700">{r.reviewer ?? <span className="text-ink-400">—</span>}</td>
                <td className="px-4 py-2.5 text-ink-600">
                  <RelativeTime iso={r.createdAt} />
                </td>
                <td className="px-4 py-2.5 text-ink-600">{r.decidedAt ? <RelativeTime iso={r.decidedAt} /> : <span className="text-ink-400">—</span>}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
