import { cn } from '@/lib/cn';

/**
 * The Earmark mark: a sheet with its corner folded down (an earmark on a page) carrying
 * one cycle of a signal. The same drawing is public/favicon.svg.
 */
export function LogoMark({ className, tone = 'dark' }: { className?: string; tone?: 'light' | 'dark' }) {
  // On the ink rail the sheet turns paper-coloured so the mark keeps its contrast.
  const sheet = tone === 'light' ? 'var(--color-paper)' : 'var(--color-ink-800)';
  const signal = tone === 'light' ? 'var(--color-ink-900)' : 'var(--color-paper)';
  return (
    <svg viewBox="0 0 32 32" aria-hidden="true" className={cn('shrink-0', className)}>
      <path d="M7 3h14l8 8v15a3 3 0 0 1-3 3H7a3 3 0 0 1-3-3V6a3 3 0 0 1 3-3Z" fill={sheet} />
      <path d="M21 3v5.5a2.5 2.5 0 0 0 2.5 2.5H29Z" fill="var(--color-brass-400)" />
      <path
        d="M8 19.5c1.6-5.2 3.6-5.2 5.2 0s3.6 5.2 5.2 0 2.9-4.1 4.6-1.2"
        fill="none"
        stroke={signal}
        strokeWidth="2.2"
        strokeLinecap="round"
      />
    </svg>
  );
}

export function Wordmark({ className, tone = 'light' }: { className?: string; tone?: 'light' | 'dark' }) {
  return (
    <span className={cn('inline-flex items-center gap-2.5', className)}>
      <LogoMark className="size-7" tone={tone} />
      <span
        className={cn(
          'text-[17px] font-semibold tracking-[-0.015em]',
          tone === 'light' ? 'text-paper' : 'text-ink-900',
        )}
      >
        Earmark
      </span>
    </span>
  );
}
