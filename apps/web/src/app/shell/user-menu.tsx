import type { CurrentUser } from '@earmark/contracts';
import { useEffect, useId, useRef, useState } from 'react';
import { Link } from 'react-router';
import { RoleBadge, roleLabels } from '@/components/role-badge';
import { Spinner } from '@/components/spinner';
import { useLogout } from '@/features/auth/api/logout';
import { highestRole } from '@/features/auth/utils/highest-role';
import { cn } from '@/lib/cn';
import { paths } from '@/lib/paths';

function initials(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean);
  const letters = parts.length > 1 ? [parts[0], parts[parts.length - 1]] : [parts[0]];
  return letters
    .map((part) => part?.[0] ?? '')
    .join('')
    .toUpperCase();
}

export function UserMenu({ user }: { user: CurrentUser }) {
  const [open, setOpen] = useState(false);
  const menuId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const triggerRef = useRef<HTMLButtonElement>(null);
  const firstItemRef = useRef<HTMLAnchorElement>(null);
  const logout = useLogout();
  const role = highestRole(user);

  useEffect(() => {
    if (!open) return;
    firstItemRef.current?.focus();
    const onPointerDown = (event: PointerEvent) => {
      if (event.target instanceof Node && !rootRef.current?.contains(event.target)) setOpen(false);
    };
    const onKeyDown = (event: KeyboardEvent) => {
      if (event.key === 'Escape') {
        setOpen(false);
        triggerRef.current?.focus();
      }
    };
    document.addEventListener('pointerdown', onPointerDown);
    document.addEventListener('keydown', onKeyDown);
    return () => {
      document.removeEventListener('pointerdown', onPointerDown);
      document.removeEventListener('keydown', onKeyDown);
    };
  }, [open]);

  return (
    <div ref={rootRef} className="relative">
      <button
        ref={triggerRef}
        type="button"
        aria-haspopup="menu"
        aria-expanded={open}
        aria-controls={open ? menuId : undefined}
        onClick={() => setOpen((value) => !value)}
        className={cn(
          'flex w-full items-center gap-3 rounded-md px-2 py-2 text-left transition-colors',
          'hover:bg-white/[0.06] focus-visible:bg-white/[0.06]',
          open && 'bg-white/[0.06]',
        )}
      >
        <span
          aria-hidden="true"
          className="grid size-8 shrink-0 place-items-center rounded-full bg-brass-400 text-xs font-semibold text-ink-950"
        >
          {initials(user.displayName)}
        </span>
        <span className="hidden min-w-0 flex-1 sm:block">
          <span className="block truncate text-sm font-medium text-paper">{user.displayName}</span>
          <span className="mt-0.5 block truncate text-xs text-ink-400">
            {role ? roleLabels[role] : 'No project role'}
          </span>
        </span>
        <svg viewBox="0 0 12 12" aria-hidden="true" className="hidden size-3 shrink-0 text-ink-400 sm:block">
          <path d="m3 7.5 3-3 3 3" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      </button>

      {open ? (
        <div
          id={menuId}
          role="menu"
          aria-label="Account"
          className={cn(
            'absolute right-0 z-30 w-64 overflow-hidden rounded-lg border border-line bg-paper-raised text-ink-900 shadow-xl shadow-ink-950/20',
            'top-full mt-2 md:left-0 md:right-auto md:top-auto md:bottom-full md:mt-0 md:mb-2',
          )}
        >
          <div className="border-b border-line px-4 py-3">
            <p className="truncate text-sm font-semibold">{user.displayName}</p>
            <p className="truncate text-xs text-ink-500">{user.email}</p>
            <div className="mt-2">
              {role ? <RoleBadge role={role} /> : <span className="text-xs text-ink-500">No project role yet</span>}
            </div>
          </div>
          {user.memberships.length > 0 ? (
            <div className="border-b border-line px-4 py-2.5">
              <p className="text-[11px] font-semibold uppercase tracking-[0.06em] text-ink-500">Project roles</p>
              <ul className="mt-1.5 space-y-1">
                {user.memberships.map((membership) => (
                  <li key={membership.projectKey} className="flex items-center justify-between gap-3 text-xs">
                    <span className="truncate font-mono text-ink-700">{membership.projectKey}</span>
                    <span className="shrink-0 text-ink-600">{roleLabels[membership.role]}</span>
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
          <div className="p-1.5">
            <Link
              ref={firstItemRef}
              to={paths.account()}
              role="menuitem"
              onClick={() => setOpen(false)}
              className="flex w-full items-center gap-2.5 rounded-md px-2.5 py-2 text-sm text-ink-800 hover:bg-ink-900/5 focus-visible:bg-ink-900/5 focus-visible:outline-none"
            >
              <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4 text-ink-500">
                <circle cx="8" cy="5.5" r="2.75" fill="none" stroke="currentColor" strokeWidth="1.4" />
                <path d="M2.75 13.5c.8-2.4 2.8-3.75 5.25-3.75s4.45 1.35 5.25 3.75" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
              </svg>
              Account
            </Link>
            {user.isAdmin ? (
              <Link
                to={paths.admin()}
                role="menuitem"
                onClick={() => setOpen(false)}
                className="flex w-full items-center gap-2.5 rounded-md px-2.5 py-2 text-sm text-ink-800 hover:bg-ink-900/5 focus-visible:bg-ink-900/5 focus-visible:outline-none"
              >
                <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4 text-ink-500">
                  <path d="M2.5 4h11M2.5 8h11M2.5 12h11" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" />
                  <circle cx="5.5" cy="4" r="1.5" fill="var(--color-paper-raised)" stroke="currentColor" strokeWidth="1.4" />
                  <circle cx="10.5" cy="8" r="1.5" fill="var(--color-paper-raised)" stroke="currentColor" strokeWidth="1.4" />
                  <circle cx="6.5" cy="12" r="1.5" fill="var(--color-paper-raised)" stroke="currentColor" strokeWidth="1.4" />
                </svg>
                Admin
              </Link>
            ) : null}
            <button
              type="button"
              role="menuitem"
              disabled={logout.isPending}
              onClick={() => logout.mutate()}
              className="flex w-full items-center gap-2.5 rounded-md px-2.5 py-2 text-sm text-ink-800 hover:bg-ink-900/5 focus-visible:bg-ink-900/5 focus-visible:outline-none"
            >
              {logout.isPending ? (
                <Spinner />
              ) : (
                <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4 text-ink-500">
                  <path
                    d="M6 2.5H3.5a1 1 0 0 0-1 1v9a1 1 0 0 0 1 1H6M10.5 11 13.5 8l-3-3M13.2 8H6.5"
                    fill="none"
                    stroke="currentColor"
                    strokeWidth="1.4"
                    strokeLinecap="round"
                    strokeLinejoin="round"
                  />
                </svg>
              )}
              Sign out
            </button>
          </div>
        </div>
      ) : null}
    </div>
  );
}
