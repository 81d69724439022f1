import type { ReactNode } from 'react';

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-line-strong bg-paper-raised/60 px-6 py-12 text-center">
      <svg viewBox="0 0 48 32" aria-hidden="true" className="mx-auto mb-4 h-8 w-12 text-ink-300">
        <path d="M2 22h44M2 10h44" stroke="currentColor" strokeWidth="1.5" strokeDasharray="3 3" />
        <path d="M4 16h40" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
      </svg>
      <h2 className="text-base font-semibold text-ink-900">{title}</h2>
      {children ? <div className="mx-auto mt-1.5 max-w-md text-sm text-ink-600">{children}</div> : null}
    </div>
  );
}
