import type { ReactNode } from 'react';
import { NavLink } from 'react-router';
import { cn } from '@/lib/cn';
import { paths } from '@/lib/paths';

type NavItem = { label: string; to: string; icon: ReactNode };

// Only areas that exist are listed; builds, findings, masks, approvals, test cases and
// admin join this list (and its sections) as their pages land.
const workspaceItems: NavItem[] = [
  {
    label: 'Projects',
    to: paths.projects(),
    icon: (
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
        <path d="M2.5 4.5h4l1.2 1.5h5.8v6.5h-11Z" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinejoin="round" />
      </svg>
    ),
  },
];

export function MainNav() {
  return (
    <nav aria-label="Main" className="flex min-w-0 items-center gap-1 md:block">
      <p className="mb-2 hidden px-3 text-[11px] font-semibold uppercase tracking-[0.09em] text-ink-500 md:block">
        Workspace
      </p>
      <ul className="flex gap-1 md:block md:space-y-0.5">
        {workspaceItems.map((item) => (
          <li key={item.to}>
            <NavLink
              to={item.to}
              className={({ isActive }) =>
                cn(
                  'relative flex h-9 items-center gap-2.5 rounded-md px-3 text-sm font-medium transition-colors',
                  isActive
                    ? 'bg-white/[0.08] text-paper before:absolute before:inset-y-2 before:-left-3 before:hidden before:w-[3px] before:rounded-r before:bg-brass-400 md:before:block'
                    : 'text-ink-300 hover:bg-white/[0.05] hover:text-paper',
                )
              }
            >
              {item.icon}
              {item.label}
            </NavLink>
          </li>
        ))}
      </ul>
    </nav>
  );
}
