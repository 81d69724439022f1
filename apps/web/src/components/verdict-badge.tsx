import type { ReactElement } from 'react';
import { cn } from '@/lib/cn';

export type Verdict = 'pass' | 'fail' | 'error';

/**
 * Verdicts are told apart by shape and word first and colour second, so they survive
 * colour-blindness, greyscale print-outs and projector washes: pass is a round check,
 * fail a square cross, error a diamond with a bang.
 */
const verdicts: Record<Verdict, { label: string; className: string; icon: ReactElement }> = {
  pass: {
    label: 'Pass',
    className: 'text-pass bg-pass-soft border-pass/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
        <circle cx="6" cy="6" r="5.5" fill="currentColor" />
        <path d="m3.4 6.2 1.8 1.7 3.4-3.6" fill="none" stroke="white" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ),
  },
  fail: {
    label: 'Fail',
    className: 'text-fail bg-fail-soft border-fail/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
        <rect x="0.5" y="0.5" width="11" height="11" rx="1.5" fill="currentColor" />
        <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
      </svg>
    ),
  },
  error: {
    label: 'Error',
    className: 'text-error bg-error-soft border-error/30',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
        <path d="M6 0.3 11.7 6 6 11.7 0.3 6Z" fill="currentColor" />
        <path d="M6 3.3v3.3" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
        <circle cx="6" cy="8.6" r="0.85" fill="white" />
      </svg>
    ),
  },
};

export function VerdictBadge({ verdict, className }: { verdict: Verdict; className?: string }) {
  const { label, className: tone, icon } = verdicts[verdict];
  return (
    <span
      className={cn(
        'inline-flex h-6 items-center gap-1.5 rounded-full border pl-1.5 pr-2.5 text-xs font-semibold',
        tone,
        className,
      )}
    >
      {icon}
      {label}
    </span>
  );
}
