import { cn } from '@/lib/cn';

const styles = {
  active: 'border-pass/30 bg-pass-soft text-pass',
  invited: 'border-brass-300 bg-brass-50 text-brass-800',
  disabled: 'border-line-strong bg-ink-100 text-ink-600',
  archived: 'border-line-strong bg-ink-100 text-ink-700',
} as const;

const labels = { active: 'Active', invited: 'Invited', disabled: 'Disabled', archived: 'Archived' } as const;

/** A person's or a project's state as a small label; the word carries the meaning, colour only helps. */
export function StatusBadge({ status }: { status: keyof typeof styles }) {
  return (
    <span className={cn('inline-flex h-5 items-center rounded-[5px] border px-1.5 text-[11px] font-semibold uppercase tracking-[0.06em] whitespace-nowrap', styles[status])}>
      {labels[status]}
    </span>
  );
}
