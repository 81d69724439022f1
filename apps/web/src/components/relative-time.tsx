import { formatDateTime, formatRelativeTime } from '@/lib/format-time';
import { cn } from '@/lib/cn';

/** "3 min ago" with the exact date and time on hover (and in the machine-readable attribute). */
export function RelativeTime({ iso, className }: { iso: string; className?: string }) {
  const absolute = formatDateTime(iso);
  return (
    // relative: the sr-only text is absolutely positioned; without a positioned ancestor inside a
    // table's scroll frame it escapes the frame and widens the whole document on a phone.
    <time dateTime={iso} title={absolute} className={cn('relative whitespace-nowrap', className)}>
      {formatRelativeTime(iso)}
      <span className="sr-only"> ({absolute})</span>
    </time>
  );
}
