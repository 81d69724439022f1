import type { ProjectAuditRow } from '@earmark/contracts';
import { RelativeTime } from '@/components/relative-time';
import { Skeleton } from '@/components/skeleton';

function actorName(actor: string): { kind: string; name: string } {
  const at = actor.indexOf(':');
  return at < 0 ? { kind: '', name: actor } : { kind: actor.slice(0, at), name: actor.slice(at + 1) };
}

/** Newest first: who did what to which entity, with the state change and comment where there is one. */
export function AuditTable({ rows }: { rows: ProjectAuditRow[] }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
      <table aria-label="Audit log" className="w-full min-w-[900px] border-collapse text-sm">
        <thead>
          <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
            <th scope="col" className="h-10 px-4">When</th>
            <th scope="col" className="px-4">Actor</th>
            <th scope="col" className="px-4">Action</th>
            <th scope="col" className="px-4">Entity</th>
            <th scope="col" className="px-4">Change</th>
            <th scope="col" className="px-4">Comment</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => {
            const actor = actorName(row.actor);
            return (
              <tr key={row.id} className="border-b border-line align-top last:border-b-0">
                <td className="px-4 py-2.5 text-ink-600">
                  <RelativeTime iso={row.at} />
                </td>
                <td className="px-4 py-2.5">
                  {actor.kind && actor.kind !== 'user' ? <span className="mr-1.5 rounded border border-line-strong px-1 font-mono text-[11px] text-ink-600">{actor.kind}</span> : null}
                  <span className="text-ink-900">{actor.name}</span>
                </td>
                <td className="px-4 py-2.5 font-mono text-[13px] text-ink-900">{row.action}</td>
                <td className="px-4 py-2.5 font-mono text-[13px] text-ink-700">{row.subject}</td>
                <td className="px-4 py-2.5 font-mono text-xs text-ink-700">
                  {row.fromState || row.toState ? `${row.fromState ?? '∅'} → ${row.toState ?? '∅'}` : <span className="text-ink-400">—</span>}
                </td>
                <td className="max-w-72 px-4 py-2.5 text-ink-700">{row.comment ?? <span className="text-ink-400">—</span>}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

export function AuditTableSkeleton() {
  return (
    <div aria-busy="true" className="space-y-2 rounded-lg border border-line bg-paper-raised p-4">
      {Array.from({ length: 6 }, (_, i) => (
        <Skeleton key={i} className="h-7" />
      ))}
    </div>
  );
}
