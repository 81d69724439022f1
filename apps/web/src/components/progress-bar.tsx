import { cn } from '@/lib/cn';

/** A determinate progress bar; the label is what a screen reader announces. */
export function ProgressBar({ value, max, label, className }: { value: number; max: number; label: string; className?: string }) {
  const ratio = max > 0 ? Math.min(1, Math.max(0, value / max)) : 0;
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={max}
      aria-valuenow={value}
      className={cn('h-1.5 overflow-hidden rounded-full bg-brass-100', className)}
    >
      <div className="h-full rounded-full bg-brass-500 transition-[width] duration-500" style={{ width: `${ratio * 100}%` }} />
    </div>
  );
}
