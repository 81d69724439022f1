import type { ReactNode } from 'react';

/** A schema message under the cell it is about; `data-issue-path` names that path for tests and tooling. */
export function IssueText({ path, messages }: { path: string; messages: readonly string[] }) {
  if (!messages.length) return null;
  return (
    <p data-issue-path={path} className="mt-0.5 max-w-64 text-left text-[11.5px] leading-snug text-fail">
      {messages.join('; ')}
    </p>
  );
}

/** Square icon button for table rows; the label is its accessible name and tooltip. */
export function SmallButton({ label, onClick, disabled, children }: { label: string; onClick: () => void; disabled?: boolean; children: ReactNode }) {
  return (
    <button
      type="button"
      aria-label={label}
      title={label}
      onClick={onClick}
      disabled={disabled}
      className="grid size-8 place-items-center rounded-md text-ink-500 hover:bg-ink-900/5 hover:text-ink-900 disabled:cursor-not-allowed disabled:opacity-30"
    >
      <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round">
        {children}
      </svg>
    </button>
  );
}
