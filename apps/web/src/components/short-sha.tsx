import { Link } from 'react-router';
import { cn } from '@/lib/cn';
import { shortSha } from '@/lib/sha';
import { CopyButton } from './copy-button';

/** A commit SHA in mono, shortened, with the full SHA on hover and a copy button for it. */
export function ShortSha({ sha, to, className }: { sha: string; to?: string; className?: string }) {
  const text = (
    <code title={sha} className="font-mono text-[13px] text-ink-900">
      {shortSha(sha)}
    </code>
  );
  return (
    <span className={cn('inline-flex items-center gap-1', className)}>
      {to ? (
        <Link to={to} className="rounded underline-offset-4 hover:underline" onClick={(event) => event.stopPropagation()}>
          {text}
        </Link>
      ) : (
        text
      )}
      <CopyButton value={sha} label={`Copy SHA ${shortSha(sha)}`} compact />
    </span>
  );
}
