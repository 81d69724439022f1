import { Toaster as SonnerToaster, toast } from 'sonner';

/**
 * Feedback for every workflow action (submit, approve, reject, invite, re-analyse…): one
 * place so the wording and the look stay the same. Errors stay until dismissed; successes
 * fade. The live region is announced by screen readers.
 */
export const notify = {
  success: (title: string, description?: string) => toast.success(title, { description }),
  error: (title: string, description?: string) => toast.error(title, { description, duration: Infinity, closeButton: true }),
  info: (title: string, description?: string) => toast(title, { description }),
};

export function Toaster() {
  return (
    <SonnerToaster
      position="bottom-right"
      toastOptions={{ className: 'font-sans text-sm', style: { maxWidth: 'calc(100vw - 2rem)' } }}
      containerAriaLabel="Notifications"
    />
  );
}
