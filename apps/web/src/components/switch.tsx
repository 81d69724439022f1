import { cn } from '@/lib/cn';

/** An on/off control named by a visible label (`labelledBy`); `busy` while the change is saved. */
export function Switch({ checked, busy, labelledBy, describedBy, onChange }: { checked: boolean; busy: boolean; labelledBy: string; describedBy: string; onChange: (next: boolean) => void }) {
  return (
    <button
      type="button"
      role="switch"
      aria-checked={checked}
      aria-labelledby={labelledBy}
      aria-describedby={describedBy}
      aria-busy={busy || undefined}
      disabled={busy}
      onClick={() => onChange(!checked)}
      className={cn(
        'relative inline-flex h-6 w-11 shrink-0 items-center rounded-full border transition-colors disabled:cursor-wait',
        checked ? 'border-ink-900 bg-ink-900' : 'border-line-strong bg-ink-100',
      )}
    >
      <span className={cn('inline-block size-4.5 rounded-full bg-white shadow transition-transform', checked ? 'translate-x-5.5' : 'translate-x-0.5')} />
    </button>
  );
}
