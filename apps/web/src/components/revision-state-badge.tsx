import type { ReactElement } from 'react';
import { cn } from '@/lib/cn';

export type RevisionState = 'draft' | 'in_review' | 'approved' | 'superseded' | 'rejected';

/**
 * Mask revision states, each with its own glyph and word so none relies on colour (and
 * none borrows a verdict's colour: a state is not a test outcome). Weight follows how
 * binding the revision is: a dashed draft, a tinted review, a solid approval; superseded
 * and rejected fall back to quiet outlines.
 */
const states: Record<RevisionState, { label: string; className: string; icon: ReactElement }> = {
  draft: {
    label: 'Draft',
    className: 'border-dashed border-ink-400 text-ink-700 bg-transparent',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <path d="M2 10l.6-2.4L8 2.2 9.8 4 4.4 9.4Z" fill="none" stroke="currentColor" strokeWidth="1.3" strokeLinejoin="round" />
      </svg>
    ),
  },
  in_review: {
    label: 'In review',
    className: 'border-ink-300 bg-ink-100 text-ink-900',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <path d="M3 1.5h6M3 10.5h6M3.5 1.5c0 3 5 3 5 4.5s-5 1.5-5 4.5M8.5 1.5c0 3-5 3-5 4.5" fill="none" stroke="currentColor" strokeWidth="1.2" strokeLinecap="round" />
      </svg>
    ),
  },
  approved: {
    label: 'Approved',
    className: 'border-ink-900 bg-ink-900 text-paper',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <path d="M6 .8 10.5 2.6v3.2c0 2.6-2 4.6-4.5 5.4C3.5 10.4 1.5 8.4 1.5 5.8V2.6Z" fill="currentColor" />
        <path d="m3.9 6 1.5 1.4 2.7-2.9" fill="none" stroke="var(--color-ink-900)" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ),
  },
  superseded: {
    label: 'Superseded',
    className: 'border-line-strong bg-transparent text-ink-500',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <circle cx="6" cy="6" r="4.6" fill="none" stroke="currentColor" strokeWidth="1.2" />
        <path d="M3.5 6h5m-1.8-1.8L8.5 6 6.7 7.8" fill="none" stroke="currentColor" strokeWidth="1.2" strokeLinecap="round" strokeLinejoin="round" />
      </svg>
    ),
  },
  rejected: {
    label: 'Rejected',
    className: 'border-ink-400 bg-paper-raised text-ink-800',
    icon: (
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0">
        <circle cx="6" cy="6" r="4.6" fill="none" stroke="currentColor" strokeWidth="1.2" />
        <path d="M2.8 9.2 9.2 2.8" stroke="currentColor" strokeWidth="1.2" />
      </svg>
    ),
  },
};

export const revisionStateLabels: Record<RevisionState, string> = {
  draft: states.draft.label,
  in_review: states.in_review.label,
  approved: states.approved.label,
  superseded: states.superseded.label,
  rejected: states.rejected.label,
};

export function RevisionStateBadge({ state, className }: { state: RevisionState; className?: string }) {
  const s = states[state];
  return (
    <span
      data-state={state}
      className={cn('inline-flex h-6 items-center gap-1.5 rounded-[5px] border px-2 text-xs font-medium whitespace-nowrap', s.className, className)}
    >
      {s.icon}
      {s.label}
    </span>
  );
}
