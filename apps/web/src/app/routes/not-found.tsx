import { Link, useLocation } from 'react-router';
import { paths } from '@/lib/paths';

export function NotFound({ title = 'Page not found', detail }: { title?: string; detail?: string }) {
  const location = useLocation();
  return (
    <div className="mx-auto max-w-xl py-16 text-center">
      <title>{`${title} · Earmark`}</title>
      <svg viewBox="0 0 120 48" aria-hidden="true" className="mx-auto mb-6 h-12 w-32 text-ink-300">
        <path d="M2 24h30" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
        <path d="M88 24h30" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
        <path d="M40 24h40" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeDasharray="2 6" />
        <circle cx="60" cy="24" r="5" fill="var(--color-brass-400)" />
      </svg>
      <p className="font-mono text-sm text-ink-500">404</p>
      <h1 className="mt-1 text-2xl font-semibold tracking-[-0.02em] text-ink-950">{title}</h1>
      <p className="mt-2 text-sm text-ink-600">
        {detail ?? (
          <>
            Nothing lives at <code className="font-mono text-ink-800">{location.pathname}</code>. The link may be old,
            or the address mistyped.
          </>
        )}
      </p>
      <Link
        to={paths.projects()}
        className="mt-6 inline-flex h-9 items-center rounded-md bg-ink-900 px-3.5 text-sm font-medium text-paper hover:bg-ink-800"
      >
        Back to projects
      </Link>
    </div>
  );
}

export function NotFoundRoute() {
  return <NotFound />;
}
