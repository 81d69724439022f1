import { describeCheckDiff, type CheckDiffStatus, type MaskDiff, type MaskRevisionDto } from '@earmark/contracts';
import { ErrorState } from '@/components/error-state';
import { Select } from '@/components/form-controls';
import { RevisionStateBadge } from '@/components/revision-state-badge';
import { Skeleton } from '@/components/skeleton';
import { cn } from '@/lib/cn';
import { useMaskDiff } from '../api/get-mask-diff';

const statusStyle: Record<CheckDiffStatus, { label: string; mark: string; className: string }> = {
  added: { label: 'Added', mark: '+', className: 'border-ink-900 bg-ink-900 text-paper' },
  removed: { label: 'Removed', mark: '−', className: 'border-ink-400 text-ink-700 line-through' },
  changed: { label: 'Changed', mark: '~', className: 'border-ink-300 bg-ink-100 text-ink-900' },
  unchanged: { label: 'Unchanged', mark: '=', className: 'border-line-strong text-ink-500' },
};

function show(value: unknown): string {
  if (value === undefined) return '—';
  return typeof value === 'string' ? value : JSON.stringify(value);
}

/** A setting that is absent on one side reads as the engine's default. */
const showSetting = (value: unknown) => (value === null || value === undefined ? 'default' : show(value));

/**
 * Stimulus, analysis and channel-map changes, above the checks: they change how every capture
 * is measured, so a reviewer must not miss them among limit edits.
 */
function SettingsChanges({ changes }: { changes: MaskDiff['settingsChanges'] }) {
  return (
    <div role="note" aria-label="Settings changes" className="space-y-2 rounded-md border border-ink-300 bg-ink-100 px-3 py-2">
      <p className="text-sm text-ink-900">
        <span className="font-semibold">Judging settings change.</span> Captures judged under this revision are measured with these settings once it is
        approved: they can turn verdicts as much as the limits can.
      </p>
      <table aria-label="Settings differences" className="w-full border-collapse text-sm">
        <thead>
          <tr className="text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
            <th scope="col" className="pr-3">Setting</th>
            <th scope="col" className="pr-3">Before</th>
            <th scope="col">After</th>
          </tr>
        </thead>
        <tbody>
          {changes.map((change) => (
            <tr key={change.path} className="align-top">
              <td className="py-1 pr-3 font-mono text-xs text-ink-800">{change.path}</td>
              <td className="max-w-72 py-1 pr-3 font-mono text-xs break-all text-ink-600">{showSetting(change.before)}</td>
              <td className="max-w-72 py-1 font-mono text-xs break-all text-ink-950">{showSetting(change.after)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** Two revisions compared check by check (matched by id), each changed field with its before and after. */
export function RevisionDiff({
  projectKey,
  caseKey,
  head,
  base,
  revisions,
  onBaseChange,
}: {
  projectKey: string;
  caseKey: string;
  head: number;
  base: number | null;
  revisions: MaskRevisionDto[];
  onBaseChange: (base: number | null) => void;
}) {
  const diff = useMaskDiff(projectKey, caseKey, head, base);
  return (
    <section aria-label={`Changes in revision ${head}`} className="space-y-3 rounded-lg border border-line bg-paper-raised p-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <h2 className="text-sm font-semibold text-ink-950">
          Changes in revision {head}
          {diff.data ? <span className="font-normal text-ink-600"> against revision {diff.data.base.revision}</span> : null}
        </h2>
        <label className="flex items-center gap-2 text-xs text-ink-600">
          Compare with
          <Select value={base ?? ''} onChange={(e) => onBaseChange(e.target.value ? Number(e.target.value) : null)} className="h-8 text-xs">
            <option value="">Its predecessor</option>
            {revisions
              .filter((r) => r.revision !== head)
              .map((r) => (
                <option key={r.revision} value={r.revision}>
                  Revision {r.revision}
                </option>
              ))}
          </Select>
        </label>
      </div>
      {diff.isPending ? (
        <Skeleton className="h-24" />
      ) : diff.isError ? (
        <ErrorState error={diff.error} onRetry={() => void diff.refetch()} />
      ) : (
        <>
          <p className="flex flex-wrap items-center gap-2 text-xs text-ink-600">
            <RevisionStateBadge state={diff.data.base.state} /> <span className="font-mono">#{diff.data.base.revision}</span> →
            <RevisionStateBadge state={diff.data.head.state} /> <span className="font-mono">#{diff.data.head.revision}</span>
            <span className="ml-2 font-mono">
              {diff.data.summary.added} added · {diff.data.summary.removed} removed · {diff.data.summary.changed} changed · {diff.data.summary.unchanged} unchanged
            </span>
            {diff.data.noteChanged ? <span>· note changed</span> : null}
            {diff.data.targetChanged ? <span>· target changed</span> : null}
            {diff.data.settingsChanges.length === 0 ? <span>· settings unchanged</span> : null}
          </p>
          {diff.data.settingsChanges.length ? <SettingsChanges changes={diff.data.settingsChanges} /> : null}
          <div className="overflow-x-auto">
            <table aria-label="Check differences" className="w-full min-w-[520px] border-collapse text-sm">
              <thead>
                <tr className="border-b border-line text-left text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">
                  <th scope="col" className="h-9 w-32 pr-3">Status</th>
                  <th scope="col" className="pr-3">Check</th>
                  <th scope="col">What changes</th>
                </tr>
              </thead>
              <tbody>
                {diff.data.checks.map((check) => {
                  const style = statusStyle[check.status];
                  // In words ("upper limit at 8 kHz: +1.50 → +1.00 dB"), never raw paths like `upper.0.db`.
                  const sentences = describeCheckDiff(check);
                  return (
                    <tr key={check.id} className="border-b border-line align-top">
                      <td className="py-2 pr-3">
                        <span className={cn('inline-flex h-6 items-center gap-1.5 rounded-[5px] border px-2 text-xs font-medium', style.className)}>
                          <span aria-hidden="true" className="font-mono">{style.mark}</span>
                          {style.label}
                        </span>
                      </td>
                      <td className="py-2 pr-3 font-mono text-[13px]">{check.id}</td>
                      <td className="py-2 text-[13px] text-ink-900">
                        {sentences.length ? (
                          <ul className="space-y-0.5">
                            {sentences.map((sentence, i) => (
                              <li key={i} className="break-words">
                                {sentence}
                              </li>
                            ))}
                          </ul>
                        ) : (
                          <span className="text-ink-500">—</span>
                        )}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </>
      )}
    </section>
  );
}
