import { httpLinkOrNull } from '../utils/http-link';

/** The build's CI pipeline link, opening in a new tab; nothing at all unless the URL is http(s). */
export function PipelineLink({ url }: { url: string | null }) {
  const href = httpLinkOrNull(url);
  if (!href) return null;
  return (
    <a
      href={href}
      target="_blank"
      rel="noreferrer noopener"
      className="inline-flex h-9 items-center gap-1.5 rounded-md px-3 text-sm font-medium text-ink-700 hover:bg-ink-900/5"
    >
      Pipeline
      <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
        <path d="M4.5 2.5h5v5M9.5 2.5 3 9" fill="none" stroke="currentColor" strokeWidth="1.3" strokeLinecap="round" />
      </svg>
      <span className="sr-only">(opens in a new tab)</span>
    </a>
  );
}
