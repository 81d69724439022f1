import type { DriftFlag } from '@earmark/contracts';
import { formatMargin, formatQuantity, marginUnit } from '@earmark/contracts';
import { shortSha } from '@/lib/sha';

/**
 * Checks that still pass but whose margin has shrunk by more than the project's drift
 * threshold over the recent builds of this branch: a regression on its way.
 */
export function DriftNotice({ drift }: { drift: DriftFlag[] }) {
  if (drift.length === 0) return null;
  return (
    <section aria-label="Drift" className="rounded-lg border border-line bg-paper-raised px-5 py-4">
      <h2 className="flex items-center gap-2 text-sm font-semibold text-ink-950">
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4 text-ink-700">
          <path d="M2 4l4 4 3-3 5 6" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinejoin="round" />
          <path d="M11 11h3V8" fill="none" stroke="currentColor" strokeWidth="1.6" />
        </svg>
        Drifting toward a limit ({drift.length})
      </h2>
      <p className="mt-1 text-xs text-ink-600">Still passing, but the margin shrank by more than the project's threshold over the last builds of this branch.</p>
      <ul className="mt-3 space-y-1.5 text-sm">
        {drift.map((d) => (
          <li key={`${d.testCase}/${d.target}/${d.checkId}`} data-drift-check={d.checkId} className="flex flex-wrap items-baseline gap-x-2">
            <span className="font-mono text-[13px] text-ink-950">{d.checkId}</span>
            <span className="text-ink-600">
              {d.testCase} on {d.target}:
            </span>
            <span className="font-mono text-[13px] tabular-nums">
              margin {formatMargin(d.bestMargin, d.unit)} at {shortSha(d.bestSha)} → {formatMargin(d.latestMargin, d.unit)} now
            </span>
            <span className="text-xs text-ink-500">
              (shrank {formatQuantity(d.shrinkDb, marginUnit(d.unit))} over {d.builds} builds; threshold {formatQuantity(d.thresholdDb, marginUnit(d.unit))})
            </span>
          </li>
        ))}
      </ul>
    </section>
  );
}
