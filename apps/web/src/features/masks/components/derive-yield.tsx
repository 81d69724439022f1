import { formatDecibels, type YieldEstimate } from '@earmark/contracts';
import { yieldAtGuard, yieldDetails, yieldHeadline } from '../utils/derive-wizard';

/**
 * The estimated false-reject rate at the slider's guard band, read from the table the API sent
 * with the proposal (0.1 dB steps), so it follows the slider without a request.
 */
export function DeriveYield({ estimate, guardDb }: { estimate: YieldEstimate | undefined; guardDb: number }) {
  const row = estimate ? yieldAtGuard(estimate, guardDb) : null;
  if (!row) return null;
  const details = yieldDetails(row);
  return (
    <section aria-label="Yield estimate" className="rounded-md border border-line bg-paper-raised px-3 py-2">
      <p className="text-sm text-ink-700">
        With a guard band of <span className="font-mono tabular-nums">{formatDecibels(row.guardDb)}</span>,
      </p>
      <p role="status" aria-live="polite" className="text-lg font-semibold text-ink-950">
        {yieldHeadline(row)}
      </p>
      <ul className="mt-1 space-y-0.5 text-xs text-ink-600">
        {details.leaveOneOut ? <li>{details.leaveOneOut}</li> : <li>Leave-one-out needs at least three golden captures.</li>}
        <li>{details.parametric}</li>
      </ul>
    </section>
  );
}
