import { ApiError } from '@/lib/api-error';
import { cn } from '@/lib/cn';

/** A failed action (not a failed page load): the API's title and detail in the square-cross style of form errors. */
export function InlineError({ error, className }: { error: unknown; className?: string }) {
  const title = error instanceof ApiError ? error.title : 'Something went wrong';
  const detail = error instanceof ApiError ? error.detail : 'The action could not be completed.';
  const status = error instanceof ApiError && error.status > 0 ? error.status : null;
  return (
    <div role="alert" className={cn('flex gap-2.5 rounded-md border border-fail/30 bg-fail-soft px-3 py-2.5 text-sm text-ink-900', className)}>
      <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 size-4 shrink-0 text-fail">
        <rect x="1" y="1" width="14" height="14" rx="2" fill="currentColor" />
        <path d="m5.2 5.2 5.6 5.6m0-5.6-5.6 5.6" stroke="white" strokeWidth="1.6" strokeLinecap="round" />
      </svg>
      <p>
        <span className="font-semibold">{title}</span>
        {status ? <span className="ml-1.5 font-mono text-xs text-ink-500">HTTP {status}</span> : null}
        {detail ? <span className="block text-ink-700">{detail}</span> : null}
      </p>
    </div>
  );
}
