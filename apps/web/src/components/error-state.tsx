import type { ReactNode } from 'react';
import { ApiError } from '@/lib/api-error';
import { Button } from './button';

function describe(error: unknown): { title: string; detail: string | undefined } {
  if (error instanceof ApiError) return { title: error.title, detail: error.detail };
  // Anything else is a bug in the app, not something the user caused; keep it plain.
  return { title: 'Something went wrong', detail: 'An unexpected error stopped this page from loading.' };
}

/** The one way a failed load is shown: the API's own title and detail, and a way out. */
export function ErrorState({
  error,
  onRetry,
  actions,
}: {
  error: unknown;
  onRetry?: () => void;
  actions?: ReactNode;
}) {
  const { title, detail } = describe(error);
  const status = error instanceof ApiError && error.status > 0 ? error.status : null;
  return (
    <div role="alert" className="rounded-lg border border-line bg-paper-raised px-6 py-8">
      <div className="flex items-start gap-4">
        <svg viewBox="0 0 20 20" aria-hidden="true" className="mt-0.5 size-5 shrink-0 text-error">
          <path d="M10 1 19 10 10 19 1 10Z" fill="currentColor" />
          <path d="M10 5.8v5" stroke="white" strokeWidth="1.8" strokeLinecap="round" />
          <circle cx="10" cy="14" r="1.1" fill="white" />
        </svg>
        <div className="min-w-0">
          <h2 className="text-base font-semibold text-ink-950">
            {title}
            {status ? <span className="ml-2 font-mono text-xs font-normal text-ink-500">HTTP {status}</span> : null}
          </h2>
          {detail ? <p className="mt-1 text-sm text-ink-600">{detail}</p> : null}
          {onRetry || actions ? (
            <div className="mt-4 flex flex-wrap gap-2">
              {onRetry ? (
                <Button variant="secondary" onClick={onRetry}>
                  Try again
                </Button>
              ) : null}
              {actions}
            </div>
          ) : null}
        </div>
      </div>
    </div>
  );
}
