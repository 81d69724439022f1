import { useId, type ReactNode, type RefObject } from 'react';

/**
 * A titled card for one part of the capture page. It is a named region (its heading names
 * it), so assistive tech and tests can find "Spectrum", "Checks", "Listen" by name.
 */
export function PanelCard({
  id,
  title,
  aside,
  toolbar,
  children,
  sectionRef,
  className,
}: {
  id?: string;
  title: string;
  aside?: ReactNode;
  toolbar?: ReactNode;
  children: ReactNode;
  sectionRef?: RefObject<HTMLElement | null>;
  className?: string;
}) {
  const headingId = useId();
  return (
    <section
      id={id}
      ref={sectionRef}
      aria-labelledby={headingId}
      className={`scroll-mt-6 rounded-lg border border-line bg-paper-raised shadow-[0_1px_0_rgb(0_0_0/0.03)] ${className ?? ''}`}
    >
      <div className="flex flex-wrap items-center justify-between gap-x-4 gap-y-1 border-b border-line px-4 py-3">
        <h2 id={headingId} className="text-sm font-semibold tracking-[-0.005em] text-ink-950">
          {title}
        </h2>
        {aside}
      </div>
      {toolbar ? <div className="flex flex-wrap items-center gap-2 border-b border-line bg-paper/50 px-4 py-2">{toolbar}</div> : null}
      <div className="px-4 py-4">{children}</div>
    </section>
  );
}

/** Square icon button for plot tools; the label is its accessible name and tooltip. */
export function PlotToolbarButton({
  label,
  onClick,
  disabled,
  children,
}: {
  label: string;
  onClick: () => void;
  disabled?: boolean;
  children: ReactNode;
}) {
  return (
    <button
      type="button"
      aria-label={label}
      title={label}
      onClick={onClick}
      disabled={disabled}
      className="grid size-8 place-items-center rounded-md border border-line-strong bg-paper-raised text-ink-700 hover:border-ink-400 hover:text-ink-950 disabled:cursor-not-allowed disabled:opacity-40"
    >
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4" fill="none" stroke="currentColor" strokeWidth="1.4" strokeLinecap="round" strokeLinejoin="round">
        {children}
      </svg>
    </button>
  );
}
