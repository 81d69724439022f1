import type { AwaitingItem } from '@earmark/contracts';
import { Link } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { paths } from '@/lib/paths';

/**
 * Reviews and waiver requests the viewer may decide (their role allows it and they did not write
 * them). Roles that decide nothing are told so, instead of an empty list that reads as "all done".
 */
export function AwaitingYou({ projectKey, items, mayDecide }: { projectKey: string; items: AwaitingItem[]; mayDecide: boolean }) {
  return (
    <section aria-labelledby="awaiting-you" className="rounded-lg border border-line bg-paper-raised">
      <h2 id="awaiting-you" className="flex items-center justify-between gap-3 border-b border-line px-5 py-3 text-sm font-semibold text-ink-950">
        <span>
          Awaiting your decision {items.length > 0 ? <span className="font-mono tabular-nums text-ink-500">({items.length})</span> : null}
        </span>
        {mayDecide ? (
          <Link to={paths.approvals(projectKey)} className="text-xs font-medium text-ink-700 underline-offset-4 hover:underline">
            Open approvals
          </Link>
        ) : null}
      </h2>
      {!mayDecide ? (
        <p className="px-5 py-4 text-sm text-ink-600">QA managers decide mask reviews and waiver requests; your role follows them here.</p>
      ) : items.length === 0 ? (
        <p className="px-5 py-4 text-sm text-ink-600">Nothing waits for you: no review or waiver request that someone else wrote.</p>
      ) : (
        <ul className="divide-y divide-line">
          {items.map((item) => (
            <li key={`${item.kind}:${item.id}`} data-awaiting={item.kind} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 px-5 py-3 text-sm">
              <span className="min-w-0">
                <span className="font-medium text-ink-950">{item.kind === 'revision' ? 'Mask review' : 'Waiver request'}</span>{' '}
                <span className="text-ink-700">
                  {item.kind === 'revision' ? item.subject : <span className="font-mono text-[13px]">{item.subject}</span>} of{' '}
                  <span className="font-mono text-[13px]">{item.testCase}</span>
                </span>
              </span>
              <span className="text-xs text-ink-500">
                by {item.requestedBy}, <RelativeTime iso={item.requestedAt} />
              </span>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
