import { useEffect, useId, useLayoutEffect, useRef, useState, type ReactNode } from 'react';
import { createPortal } from 'react-dom';
import { cn } from '@/lib/cn';

export type MenuOption = {
  value: string;
  label: ReactNode;
  /** Plain text of the label, for type-ahead and the accessible name. */
  text: string;
  hint?: ReactNode;
};

/**
 * A button that opens a menu of choices; choosing one calls `onSelect` (Enter, Space or
 * click; arrow keys only move). Used instead of a <select> that acts on change, because
 * some browsers fire `change` on every arrow key in a closed select, which would send one
 * API request per keypress. The menu is positioned against the viewport so table
 * containers with overflow do not clip it.
 */
export function MenuButton({
  label,
  options,
  selected,
  onSelect,
  disabled,
  busy,
  buttonClassName,
  ariaLabel,
  menuLabel,
}: {
  label: ReactNode;
  options: MenuOption[];
  selected?: string | null;
  onSelect: (value: string) => void;
  disabled?: boolean;
  busy?: boolean;
  buttonClassName?: string;
  ariaLabel?: string;
  menuLabel: string;
}) {
  const [open, setOpen] = useState(false);
  const [position, setPosition] = useState<{ top: number; left: number } | null>(null);
  const menuId = useId();
  const triggerRef = useRef<HTMLButtonElement>(null);
  const menuRef = useRef<HTMLDivElement>(null);

  useLayoutEffect(() => {
    if (!open || !triggerRef.current) return;
    const rect = triggerRef.current.getBoundingClientRect();
    const width = 240;
    setPosition({
      top: rect.bottom + 4,
      left: Math.max(8, Math.min(rect.left, window.innerWidth - width - 8)),
    });
  }, [open]);

  useEffect(() => {
    if (!open) return;
    const items = () => Array.from(menuRef.current?.querySelectorAll<HTMLElement>('[role^="menuitem"]') ?? []);
    const current = items().find((item) => item.getAttribute('aria-checked') === 'true') ?? items()[0];
    // preventScroll: focusing must not scroll the page, which would close the menu again.
    current?.focus({ preventScroll: true });
    const close = (returnFocus: boolean) => {
      setOpen(false);
      if (returnFocus) triggerRef.current?.focus();
    };
    const onPointerDown = (event: PointerEvent) => {
      const target = event.target;
      if (target instanceof Node && !menuRef.current?.contains(target) && !triggerRef.current?.contains(target)) close(false);
    };
    const onKeyDown = (event: KeyboardEvent) => {
      const list = items();
      const index = list.indexOf(document.activeElement as HTMLElement);
      if (event.key === 'Escape' || event.key === 'Tab') {
        if (event.key === 'Escape') {
          event.preventDefault();
          event.stopPropagation();
        }
        close(event.key === 'Escape');
      } else if (event.key === 'ArrowDown') {
        event.preventDefault();
        list[(index + 1) % list.length]?.focus({ preventScroll: true });
      } else if (event.key === 'ArrowUp') {
        event.preventDefault();
        list[(index - 1 + list.length) % list.length]?.focus({ preventScroll: true });
      } else if (event.key === 'Home') {
        event.preventDefault();
        list[0]?.focus({ preventScroll: true });
      } else if (event.key === 'End') {
        event.preventDefault();
        list[list.length - 1]?.focus({ preventScroll: true });
      }
    };
    // Follow the trigger when the page scrolls or reflows (plots drawing late, scroll
    // anchoring); close only once the trigger has left the viewport.
    const onViewportChange = () => {
      const rect = triggerRef.current?.getBoundingClientRect();
      if (!rect || rect.bottom < 0 || rect.top > window.innerHeight) return close(false);
      setPosition({ top: rect.bottom + 4, left: Math.max(8, Math.min(rect.left, window.innerWidth - 240 - 8)) });
    };
    document.addEventListener('pointerdown', onPointerDown);
    document.addEventListener('keydown', onKeyDown, true);
    window.addEventListener('resize', onViewportChange);
    window.addEventListener('scroll', onViewportChange, true);
    return () => {
      document.removeEventListener('pointerdown', onPointerDown);
      document.removeEventListener('keydown', onKeyDown, true);
      window.removeEventListener('resize', onViewportChange);
      window.removeEventListener('scroll', onViewportChange, true);
    };
  }, [open]);

  const choose = (value: string) => {
    setOpen(false);
    triggerRef.current?.focus();
    onSelect(value);
  };

  return (
    <>
      <button
        ref={triggerRef}
        type="button"
        aria-haspopup="menu"
        aria-expanded={open}
        aria-controls={open ? menuId : undefined}
        aria-label={ariaLabel}
        aria-busy={busy || undefined}
        disabled={disabled || busy}
        onClick={(event) => {
          event.stopPropagation();
          setOpen((value) => !value);
        }}
        onKeyDown={(event) => {
          if (event.key === 'ArrowDown' && !open) {
            event.preventDefault();
            setOpen(true);
          }
        }}
        className={cn(
          'inline-flex h-8 items-center gap-1.5 rounded-md border border-line-strong bg-paper-raised px-2.5 text-[13px] font-medium text-ink-800 hover:border-ink-400 disabled:cursor-not-allowed disabled:opacity-60',
          open && 'border-ink-500',
          buttonClassName,
        )}
      >
        {label}
        <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3 shrink-0 text-ink-400">
          <path d="m3 4.5 3 3 3-3" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      </button>
      {open
        ? createPortal(
            <div
              ref={menuRef}
              id={menuId}
              role="menu"
              aria-label={menuLabel}
              style={position ? { top: position.top, left: position.left } : { visibility: 'hidden' }}
              className="fixed z-50 max-h-80 w-60 overflow-y-auto rounded-lg border border-line bg-paper-raised p-1 shadow-xl shadow-ink-950/15"
            >
              {options.map((option, index) => {
                const checked = selected !== undefined && option.value === selected;
                const hintId = `${menuId}-hint-${index}`;
                return (
                  <button
                    key={option.value}
                    type="button"
                    role="menuitemradio"
                    aria-checked={checked}
                    aria-label={option.text}
                    aria-describedby={option.hint ? hintId : undefined}
                    tabIndex={-1}
                    onClick={() => choose(option.value)}
                    className="flex w-full items-start gap-2 rounded-md px-2.5 py-1.5 text-left text-sm text-ink-800 hover:bg-ink-900/5 focus-visible:bg-ink-900/5 focus-visible:outline-none"
                  >
                    <span aria-hidden="true" className="mt-0.5 w-3 shrink-0 text-ink-700">
                      {checked ? '✓' : ''}
                    </span>
                    <span className="min-w-0">
                      <span className="block truncate">{option.label}</span>
                      {option.hint ? (
                        <span id={hintId} className="block truncate text-xs text-ink-500">
                          {option.hint}
                        </span>
                      ) : null}
                    </span>
                  </button>
                );
              })}
            </div>,
            document.body,
          )
        : null}
    </>
  );
}
