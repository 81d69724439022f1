import type { ButtonHTMLAttributes, ReactNode } from 'react';
import { cn } from '@/lib/cn';
import { Spinner } from './spinner';

type Variant = 'primary' | 'secondary' | 'ghost';

const variants: Record<Variant, string> = {
  primary:
    'bg-ink-900 text-paper hover:bg-ink-800 active:bg-ink-950 disabled:bg-ink-300 disabled:text-ink-50 disabled:shadow-none shadow-[inset_0_-1px_0_rgb(0_0_0/0.25)]',
  secondary:
    'bg-paper-raised text-ink-900 border border-line-strong hover:border-ink-400 hover:bg-white disabled:bg-paper disabled:text-ink-400 disabled:border-line disabled:hover:border-line',
  ghost: 'text-ink-700 hover:bg-ink-900/5 disabled:text-ink-400 disabled:hover:bg-transparent',
};

export type ButtonProps = ButtonHTMLAttributes<HTMLButtonElement> & {
  variant?: Variant;
  /** Shows a spinner and blocks clicks while the action is in flight. */
  busy?: boolean;
  icon?: ReactNode;
};

export function Button({ variant = 'primary', busy = false, icon, className, children, disabled, type, ...rest }: ButtonProps) {
  return (
    <button
      type={type ?? 'button'}
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={cn(
        'inline-flex h-9 items-center justify-center gap-2 rounded-md px-3.5 text-sm font-medium transition-colors',
        'disabled:cursor-not-allowed',
        variants[variant],
        className,
      )}
      {...rest}
    >
      {busy ? <Spinner /> : icon}
      {children}
    </button>
  );
}
