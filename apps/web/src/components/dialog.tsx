import { useEffect, useId, useRef, type ReactNode } from 'react';
import { createPortal } from 'react-dom';
import { cn } from '@/lib/cn';

const FOCUSABLE =
  'a[href], button:not([disabled]), input:not([disabled]), select:not([disabled]), textarea:not([disabled]), [tabindex]:not([tabindex="-1"])';

/**
 * A modal dialog: rendered over the page, the rest of the page made inert (so neither
 * Tab nor assistive technology reaches it), Escape and the close button dismiss it, and
 * focus goes back to whatever opened it. `side` slides it in from the right as a panel.
 */
export function Dialog({
  open,
  onClose,
  title,
  description,
  children,
  footer,
  variant = 'center',
  className,
}: {
  open: boolean;
  onClose: () => void;
  title: ReactNode;
  description?: ReactNode;
  children?: ReactNode;
  footer?: ReactNode;
  variant?: 'center' | 'side';
  className?: string;
}) {
  const titleId = useId();
  const descriptionId = useId();
  const panelRef = useRef<HTMLDivElement>(null);
  const onCloseRef = useRef(onClose);
  useEffect(() => {
    onCloseRef.current = onClose;
  });

  useEffect(() => {
    if (!open) return;
    const opener = document.activeElement instanceof HTMLElement ? document.activeElement : null;
    const panel = panelRef.current;
    const host = panel?.closest<HTMLElement>('[data-dialog-host]') ?? null;
    // Everything else in <body> goes inert while the dialog is up.
    const inerted = Array.from(document.body.children).filter(
      (element): element is HTMLElement => element instanceof HTMLElement && element !== host && !element.inert,
    );
    for (const element of inerted) element.inert = true;

    const initial = panel?.querySelector<HTMLElement>('[data-autofocus]') ?? panel?.querySelector<HTMLElement>(FOCUSABLE);
    (initial ?? panel)?.focus();

    const onKeyDown = (event: KeyboardEvent) => {
      if (event.key === 'Escape') {
        event.stopPropagation();
        onCloseRef.current();
        return;
      }
      if (event.key !== 'Tab' || !panel) return;
      const focusable = Array.from(panel.querySelectorAll<HTMLElement>(FOCUSABLE));
      const first = focusable[0];
      const last = focusable[focusable.length - 1];
      if (!first || !last) return;
      if (event.shiftKey && document.activeElement === first) {
        event.preventDefault();
        last.focus();
      } else if (!event.shiftKey && document.activeElement === last) {
        event.preventDefault();
        first.focus();
      }
    };
    document.addEventListener('keydown', onKeyDown);
    return () => {
      document.removeEventListener('keydown', onKeyDown);
      for (const element of inerted) element.inert = false;
      opener?.focus();
    };
  }, [open]);

  if (!open) return null;

  return createPortal(
    <div data-dialog-host="" className="fixed inset-0 z-40">
      <div aria-hidden="true" className="absolute inset-0 bg-ink-950/40" onClick={() => onCloseRef.current()} />
      <div
        ref={panelRef}
        role="dialog"
        aria-modal="true"
        aria-labelledby={titleId}
        aria-describedby={description ? descriptionId : undefined}
        tabIndex={-1}
        className={cn(
          'absolute flex flex-col bg-paper-raised text-ink-900 shadow-2xl shadow-ink-950/30 focus:outline-none',
          variant === 'center'
            ? 'top-[12vh] left-1/2 max-h-[76vh] w-[min(520px,calc(100vw-2rem))] -translate-x-1/2 rounded-lg border border-line'
            : 'inset-y-0 right-0 w-[min(460px,100vw)] border-l border-line',
          className,
        )}
      >
        <div className="flex items-start justify-between gap-4 border-b border-line px-5 py-4">
          <div className="min-w-0">
            <h2 id={titleId} className="text-base font-semibold tracking-[-0.01em] text-ink-950">
              {title}
            </h2>
            {description ? (
              <p id={descriptionId} className="mt-1 text-sm text-ink-600">
                {description}
              </p>
            ) : null}
          </div>
          <button
            type="button"
            onClick={() => onCloseRef.current()}
            aria-label="Close"
            className="-mr-1.5 grid size-8 shrink-0 place-items-center rounded-md text-ink-500 hover:bg-ink-900/5 hover:text-ink-900"
          >
            <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4">
              <path d="m4 4 8 8m0-8-8 8" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" />
            </svg>
          </button>
        </div>
        <div className="min-h-0 flex-1 overflow-y-auto px-5 py-4">{children}</div>
        {footer ? <div className="flex justify-end gap-2 border-t border-line px-5 py-3">{footer}</div> : null}
      </div>
    </div>,
    document.body,
  );
}
