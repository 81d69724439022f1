import { formatFrequency, formatMargin, formatNumberIn, type DeriveWarning, type GoldenOutlierDto } from '@earmark/contracts';
import { Button } from '@/components/button';

/** Mixed targets and the like: said before the limits are used, never silently. */
export function DeriveWarnings({ warnings }: { warnings: readonly DeriveWarning[] }) {
  if (warnings.length === 0) return null;
  return (
    <div role="alert" className="space-y-1 rounded-md border border-brass-400 bg-brass-400/10 px-3 py-2 text-sm text-ink-900">
      {warnings.map((w) => (
        <p key={w.code}>
          <span className="font-semibold">{w.code === 'mixed-targets' ? `Targets mixed: ${w.targets.join(', ')}. ` : ''}</span>
          {w.message}
        </p>
      ))}
    </div>
  );
}

/**
 * Golden captures beyond 3σ of the others, by name and where they deviate, each with a way to
 * leave it out and derive again.
 */
export function DeriveOutliers({
  outliers,
  nameOf,
  onExclude,
  busy,
}: {
  outliers: readonly GoldenOutlierDto[];
  nameOf: (captureId: string) => string;
  onExclude: (captureId: string) => void;
  busy: boolean;
}) {
  if (outliers.length === 0) return null;
  return (
    <section aria-label="Outlying golden captures" className="rounded-md border border-fail/40 bg-fail-soft px-3 py-2">
      <h4 className="text-sm font-semibold text-ink-950">
        {outliers.length === 1 ? 'One golden capture lies' : `${outliers.length} golden captures lie`} beyond 3σ of the others
      </h4>
      <ul className="mt-1 space-y-1.5">
        {outliers.map((o) => (
          <li key={o.captureId} className="flex flex-wrap items-center justify-between gap-2 text-sm">
            <span className="min-w-0">
              <span className="font-medium text-ink-950">{nameOf(o.captureId)}</span>
              <span className="text-ink-700">
                {' — '}
                {o.regions
                  .map((r) => `${formatFrequency(r.fromHz)}–${formatFrequency(r.toHz)}: ${formatMargin(r.deviationDb, 'dB')} (${formatNumberIn(Math.abs(r.sigmas), 'ratio')}σ) at ${formatFrequency(r.atHz)}`)
                  .join('; ')}
              </span>
            </span>
            <Button variant="secondary" className="h-7 px-2 text-xs" busy={busy} onClick={() => onExclude(o.captureId)}>
              Leave out and derive again
            </Button>
          </li>
        ))}
      </ul>
    </section>
  );
}
