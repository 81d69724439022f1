import { useEffect, useState, type ReactNode } from 'react';
import { useLocation } from 'react-router';
import { cn } from '@/lib/cn';

/**
 * Below 768 px the rail is a top bar: the navigation folds behind a Menu button and opens as a
 * drawer under the bar, every item on its own line, so nothing is cut off at phone width. From
 * 768 px the children sit in the rail as they are. The drawer closes when the page changes or on Escape.
 */
export function NavDrawer({ children }: { children: ReactNode }) {
  const [open, setOpen] = useState(false);
  const location = useLocation();
  useEffect(() => setOpen(false), [location.pathname, location.search]);
  useEffect(() => {
    if (!open) return;
    const closeOnEscape = (event: KeyboardEvent) => {
      if (event.key === 'Escape') setOpen(false);
    };
    window.addEventListener('keydown', closeOnEscape);
    return () => window.removeEventListener('keydown', closeOnEscape);
  }, [open]);

  return (
    <>
      <button
        type="button"
        aria-expanded={open}
        aria-controls="main-nav-drawer"
        onClick={() => setOpen((was) => !was)}
        className="ml-auto inline-flex h-9 items-center gap-2 rounded-md px-3 text-sm font-medium text-ink-300 hover:bg-white/[0.06] hover:text-paper md:hidden"
      >
        <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
          {open ? (
            <path d="m4 4 8 8m0-8-8 8" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
          ) : (
            <path d="M2.5 4h11M2.5 8h11M2.5 12h11" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
          )}
        </svg>
        Menu
      </button>
      <div
        id="main-nav-drawer"
        data-open={open || undefined}
        className={cn(
          'min-w-0 md:mt-4 md:block md:flex-none',
          open
            ? 'absolute inset-x-0 top-full max-h-[calc(100dvh-3.5rem)] overflow-y-auto border-t border-white/[0.07] bg-ink-950 px-3 pt-3 pb-4 shadow-lg md:static md:max-h-none md:overflow-visible md:border-0 md:p-0 md:shadow-none'
            : 'hidden',
        )}
      >
        {children}
      </div>
    </>
  );
}
