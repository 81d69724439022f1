import { useEffect, useState } from 'react';
import { cn } from '@/lib/cn';

type CopyState = 'idle' | 'copied' | 'failed';

/**
 * Copies `value` to the clipboard and says so for a moment. The accessible name stays
 * `label` (default "Copy") so tests and screen-reader users find it; the result is
 * announced through a live region.
 */
export function CopyButton({
  value,
  label = 'Copy',
  compact = false,
  className,
}: {
  value: string;
  label?: string;
  /** Icon only (the label becomes the accessible name and tooltip). */
  compact?: boolean;
  className?: string;
}) {
  const [state, setState] = useState<CopyState>('idle');

  useEffect(() => {
    if (state === 'idle') return;
    const timer = setTimeout(() => setState('idle'), 1800);
    return () => clearTimeout(timer);
  }, [state]);

  const copy = async () => {
    try {
      await navigator.clipboard.writeText(value);
      setState('copied');
    } catch {
      // Clipboard access can be refused (insecure origin, permissions); say so instead of pretending.
      setState('failed');
    }
  };

  const icon =
    state === 'copied' ? (
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-3.5">
        <path d="m3.5 8.5 3 3 6-7" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ) : (
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-3.5">
        <rect x="5.5" y="5.5" width="8" height="8" rx="1.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
        <path d="M10.5 3.5v-.5a1 1 0 0 0-1-1h-6a1 1 0 0 0-1 1v6a1 1 0 0 0 1 1h.5" fill="none" stroke="currentColor" strokeWidth="1.4" />
      </svg>
    );

  return (
    <span className="inline-flex items-center">
      <button
        type="button"
        onClick={(event) => {
          // Copy buttons sit inside clickable rows; copying must not also open the row.
          event.stopPropagation();
          void copy();
        }}
        aria-label={compact ? label : undefined}
        title={compact ? label : undefined}
        className={cn(
          'inline-flex items-center gap-1.5 rounded-md text-ink-500 transition-colors hover:bg-ink-900/5 hover:text-ink-900',
          compact ? 'size-6 justify-center' : 'h-8 border border-line-strong bg-paper-raised px-2.5 text-sm font-medium text-ink-800',
          className,
        )}
      >
        {icon}
        {compact ? null : label}
      </button>
      <span role="status" className="sr-only">
        {state === 'copied' ? 'Copied to the clipboard' : state === 'failed' ? 'Could not copy; select the text and copy it by hand' : ''}
      </span>
      {state === 'failed' && !compact ? <span className="ml-2 text-xs text-fail">Copy failed — select and copy by hand</span> : null}
    </span>
  );
}
