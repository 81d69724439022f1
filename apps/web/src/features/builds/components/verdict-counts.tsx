import type { VerdictCounts as Counts } from '@earmark/contracts';
import { VerdictIcon, verdictLabels } from '@/components/verdict-badge';
import { WaiverGlyph } from '@/components/waiver-note';
import { cn } from '@/lib/cn';
import { formatCount } from '@/lib/format';

const order = ['pass', 'fail', 'error', 'pending'] as const;

/**
 * Per-verdict capture counts: shape, number and (for screen readers) the word. Zeros fade.
 * Passes that only pass with a waiver are counted again after them, with the waiver's mark.
 */
export function VerdictCounts({ counts, className }: { counts: Counts; className?: string }) {
  return (
    <ul className={cn('flex items-center gap-3 font-mono text-[13px] tabular-nums', className)}>
      {order.map((verdict) => {
        const value = counts[verdict];
        return (
          <li
            key={verdict}
            title={`${verdictLabels[verdict]}: ${value}`}
            className={cn('inline-flex items-center gap-1', value === 0 ? 'opacity-35' : 'text-ink-800')}
          >
            <VerdictIcon verdict={verdict} />
            {formatCount(value)}
            <span className="sr-only"> {verdictLabels[verdict].toLowerCase()}</span>
          </li>
        );
      })}
      {counts.waived ? (
        <li data-waived="" title={`Passed with waiver: ${counts.waived}`} className="inline-flex items-center gap-1 text-ink-800">
          <WaiverGlyph />
          {formatCount(counts.waived)}
          <span className="sr-only"> of them passed with waiver</span>
        </li>
      ) : null}
    </ul>
  );
}
