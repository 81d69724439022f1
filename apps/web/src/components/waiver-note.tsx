import type { WaiverMark } from '@earmark/contracts';
import { cn } from '@/lib/cn';
import { formatDate } from '@/lib/format';

/**
 * A waiver's own mark — a tag shape, ink and brass, never a verdict colour — because a
 * waiver is a decision people made about a result, not a result.
 */
export function WaiverGlyph({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 12 12" aria-hidden="true" className={cn('size-3 shrink-0 text-brass-700', className)}>
      <path d="M1.2 2.2v3.4l5.3 5.3 4.4-4.4-5.3-5.3H2.2a1 1 0 0 0-1 1Z" fill="none" stroke="currentColor" strokeWidth="1.3" strokeLinejoin="round" />
      <circle cx="3.8" cy="3.8" r="0.9" fill="currentColor" />
    </svg>
  );
}

/**
 * "Passed with waiver, until <date>" (or, for one check, "Waived until <date>"): what an
 * approved waiver changes, and when that stops.
 */
export function WaiverNote({ waiver, kind = 'verdict', className }: { waiver: WaiverMark; kind?: 'verdict' | 'check'; className?: string }) {
  const until = formatDate(waiver.until);
  const text = kind === 'verdict' ? `Passed with waiver, until ${until}` : `Waived until ${until}`;
  return (
    <span data-waiver={waiver.id} title={`Waiver ${waiver.id} runs until ${waiver.until}`} className={cn('inline-flex items-center gap-1 text-xs text-ink-700', className)}>
      <WaiverGlyph />
      <span>
        {text}
      </span>
    </span>
  );
}
