import type { Project } from '@earmark/contracts';
import { formatCount, formatDate } from '@/lib/format';

function Stat({ label, value }: { label: string; value: number }) {
  return (
    <div className="rounded-lg border border-line bg-paper-raised px-5 py-4">
      <dt className="text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">{label}</dt>
      <dd className="mt-2 font-mono text-3xl font-medium tabular-nums tracking-tight text-ink-950">
        {formatCount(value)}
      </dd>
    </div>
  );
}

/** What a project holds today; the per-area pages (builds, masks, …) will hang off this one. */
export function ProjectOverview({ project }: { project: Project }) {
  return (
    <div className="space-y-6">
      <dl className="grid gap-4 sm:grid-cols-3">
        <Stat label="Targets" value={project.targetCount} />
        <Stat label="Test cases" value={project.testCaseCount} />
        <Stat label="Builds" value={project.buildCount} />
      </dl>
      <section className="rounded-lg border border-line bg-paper-raised px-5 py-4">
        <h2 className="text-sm font-semibold text-ink-900">About this project</h2>
        <p className="mt-1.5 max-w-3xl text-sm text-ink-700">
          {project.description || <span className="text-ink-500">No description yet.</span>}
        </p>
        <dl className="mt-4 flex flex-wrap gap-x-10 gap-y-3 border-t border-line pt-4 text-sm">
          <div>
            <dt className="text-xs text-ink-500">Key</dt>
            <dd className="mt-0.5 font-mono text-ink-900">{project.key}</dd>
          </div>
          <div>
            <dt className="text-xs text-ink-500">Created</dt>
            <dd className="mt-0.5 text-ink-900">
              <time dateTime={project.createdAt}>{formatDate(project.createdAt)}</time>
            </dd>
          </div>
        </dl>
      </section>
    </div>
  );
}
