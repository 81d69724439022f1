import type { ReactNode } from 'react';

export function PageHeader({
  eyebrow,
  title,
  titleAside,
  description,
  actions,
}: {
  eyebrow?: ReactNode;
  title: ReactNode;
  /** Shown next to the title but outside the heading, so the heading's name stays exact. */
  titleAside?: ReactNode;
  description?: ReactNode;
  actions?: ReactNode;
}) {
  return (
    <header className="flex flex-wrap items-end justify-between gap-4 border-b border-line pb-5">
      <div className="min-w-0">
        {eyebrow ? (
          <div className="mb-1.5 text-xs font-semibold uppercase tracking-[0.08em] text-ink-500">{eyebrow}</div>
        ) : null}
        <div className="flex items-baseline gap-3">
          <h1 className="text-2xl font-semibold tracking-[-0.02em] text-ink-950">{title}</h1>
          {titleAside}
        </div>
        {description ? <p className="mt-1.5 max-w-2xl text-sm text-ink-600">{description}</p> : null}
      </div>
      {actions ? <div className="flex items-center gap-2">{actions}</div> : null}
    </header>
  );
}
