import type { InputHTMLAttributes, SelectHTMLAttributes, TextareaHTMLAttributes } from 'react';
import { cn } from '@/lib/cn';

const control =
  'block rounded-md border border-line-strong bg-white text-sm text-ink-950 shadow-[inset_0_1px_1px_rgb(0_0_0/0.04)] placeholder:text-ink-400 focus:border-ink-700 focus:outline-none focus:ring-3 focus:ring-brass-300/50 aria-invalid:border-fail';

export function TextInput({ className, ...rest }: InputHTMLAttributes<HTMLInputElement>) {
  return <input className={cn(control, 'h-9 px-3', className)} {...rest} />;
}

export function Select({ className, children, ...rest }: SelectHTMLAttributes<HTMLSelectElement>) {
  return (
    <select className={cn(control, 'h-9 pr-8 pl-2.5', className)} {...rest}>
      {children}
    </select>
  );
}

export function TextArea({ className, ...rest }: TextareaHTMLAttributes<HTMLTextAreaElement>) {
  return <textarea className={cn(control, 'min-h-20 w-full px-3 py-2', className)} {...rest} />;
}

/** Small uppercase label above a filter control. */
export function FieldLabel({ htmlFor, children }: { htmlFor: string; children: string }) {
  return (
    <label htmlFor={htmlFor} className="mb-1 block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
      {children}
    </label>
  );
}
