import type { Role } from '@earmark/contracts';
import { cn } from '@/lib/cn';

export const roleLabels: Record<Role, string> = {
  admin: 'Admin',
  qa_manager: 'QA manager',
  engineer: 'Engineer',
  viewer: 'Viewer',
};

// Weight grows with privilege (outline → tint → solid), so the order reads without colour.
const roleStyles: Record<Role, string> = {
  admin: 'bg-ink-900 text-paper border-ink-900',
  qa_manager: 'bg-brass-100 text-brass-800 border-brass-300',
  engineer: 'bg-ink-100 text-ink-800 border-ink-200',
  viewer: 'bg-transparent text-ink-600 border-line-strong',
};

export function RoleBadge({ role, className, tone = 'light' }: { role: Role; className?: string; tone?: 'light' | 'dark' }) {
  return (
    <span
      className={cn(
        'inline-flex h-5 items-center rounded-[5px] border px-1.5 text-[11px] font-semibold uppercase tracking-[0.06em] whitespace-nowrap',
        tone === 'dark' ? 'border-ink-600 bg-ink-800 text-brass-200' : roleStyles[role],
        className,
      )}
    >
      {roleLabels[role]}
    </span>
  );
}
