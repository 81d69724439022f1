import type { AuditEntityRef, WorkspaceAuditRow } from '@earmark/contracts';
import { Link } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { paths } from '@/lib/paths';

/** A name, linked to its page when it has one; the stored reference is the tooltip. */
function EntityName({ entity }: { entity: AuditEntityRef }) {
  const kind = entity.kind !== 'user' && entity.kind !== 'project' ? <span className="mr-1.5 rounded border border-line-strong px-1 font-mono text-[11px] text-ink-600">{entity.kind}</span> : null;
  return (
    <span title={entity.ref}>
      {kind}
      {entity.href ? (
        <Link to={entity.href} className="text-ink-950 underline decoration-line-strong underline-offset-2 hover:decoration-ink-700">
          {entity.label}
        </Link>
      ) : (
        <span className="text-ink-900">{entity.label}</span>
      )}
    </span>
  );
}

/** Newest first: who did what, to what, in which project; every name links to its page. */
export function WorkspaceAuditTable({ rows }: { rows: WorkspaceAuditRow[] }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-line bg-paper-raised">
      <table aria-label="Workspace audit log" className="w-full min-w-[860px] border-collapse text-sm">
        <thead>
          <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
            <th scope="col" className="h-10 px-4">When</th>
            <th scope="col" className="px-4">Who</th>
            <th scope="col" className="px-4">Action</th>
            <th scope="col" className="px-4">What</th>
            <th scope="col" className="px-4">Project</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => (
            <tr key={row.id} className="border-b border-line align-top last:border-b-0">
              <td className="px-4 py-2.5 text-ink-600">
                <RelativeTime iso={row.at} />
              </td>
              <td className="px-4 py-2.5">
                <EntityName entity={row.actorRef} />
              </td>
              <td className="px-4 py-2.5 font-mono text-[13px] text-ink-900">{row.action}</td>
              <td className="px-4 py-2.5">
                <EntityName entity={row.subjectRef} />
              </td>
              <td className="px-4 py-2.5">
                {row.projectKey ? (
                  <Link to={paths.project(row.projectKey)} className="text-ink-800 hover:underline">
                    {row.projectName ?? row.projectKey}
                  </Link>
                ) : (
                  <span className="text-ink-400">Workspace</span>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
