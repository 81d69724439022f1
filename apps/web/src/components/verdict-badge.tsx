import type { ReactElement } from 'react';
import { cn } from '@/lib/cn';

export type Verdict = 'pass' | 'fail' | 'error' | 'pending' | 'running';

/**
 * Verdicts are told apart by shape and word first and colour second, so they survive
 * colour-blindness, greyscale print-outs and projector washes: pass is a round check,
 * fail a square cross, error a diamond with a bang. Not-yet-decided states are hollow:
 * pending a dashed ring, running a ring with one filled quarter.
 */
const verdicts: Record<Verdict, { label: string; className: string; icon: ReactElement }> = {
  pass: {
    label: 'Pass',
    className: 'text-pass bg-pass-soft border-pass/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <circle cx="6" cy="6" r="5.5" fill="currentColor" />
        <path d="m3.4 6.2 1.8 1.7 3.4-3.6" fill="none" stroke="white" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ),
  },
  fail: {
    label: 'Fail',
    className: 'text-fail bg-fail-soft border-fail/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <rect x="0.5" y="0.5" width="11" height="11" rx="1.5" fill="currentColor" />
        <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
      </svg>
    ),
  },
  error: {
    label: 'Error',
    className: 'text-error bg-error-soft border-error/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <path d="M6 0.3 11.7 6 6 11.7 0.3 6Z" fill="currentColor" />
        <path d="M6 3.3v3.3" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
        <circle cx="6" cy="8.6" r="0.85" fill="white" />
      </svg>
    ),
  },
  pending: {
    label: 'Pending',
    className: 'text-ink-600 bg-paper-raised border-line-strong',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <circle cx="6" cy="6" r="4.75" fill="none" stroke="currentColor" strokeWidth="1.5" strokeDasharray="2.2 1.6" />
      </svg>
    ),
  },
  running: {
    label: 'Running',
    className: 'text-ink-800 bg-ink-50 border-ink-200',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <circle cx="6" cy="6" r="4.75" fill="none" stroke="currentColor" strokeWidth="1.5" />
        <path d="M6 6V1.25A4.75 4.75 0 0 1 10.75 6Z" fill="currentColor" />
      </svg>
    ),
  },
};

export const verdictLabels: Record<Verdict, string> = {
  pass: verdicts.pass.label,
  fail: verdicts.fail.label,
  error: verdicts.error.label,
  pending: verdicts.pending.label,
  running: verdicts.running.label,
};

/** The shape alone, coloured, for dense places (counts, matrix cells); always pair it with text. */
export function VerdictIcon({ verdict, className }: { verdict: Verdict; className?: string }) {
  const { className: tone, icon } = verdicts[verdict];
  // Only the text colour of the tone applies to a bare icon.
  const colour = tone.split(' ').find((c) => c.startsWith('text-'));
  return <span className={cn('inline-flex', colour, className)}>{icon}</span>;
}

export function VerdictBadge({ verdict, className }: { verdict: Verdict; className?: string }) {
  const { label, className: tone, icon } = verdicts[verdict];
  return (
    <span
      className={cn(
        'inline-flex h-6 items-center gap-1.5 rounded-full border pl-1.5 pr-2.5 text-xs font-semibold whitespace-nowrap',
        tone,
        className,
      )}
    >
      {icon}
      {label}
    </span>
  );
}
