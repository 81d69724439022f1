import type { ReactNode } from 'react';
import { Button } from './button';
import { Dialog } from './dialog';
import { InlineError } from './inline-error';

/**
 * "Are you sure?" for an act that is hard to take back (disable a person, archive a project,
 * remove a member): Cancel has the focus, the act is named on its button, and the API's refusal
 * shows inside the dialog.
 */
export function ActionConfirmDialog({
  open,
  title,
  children,
  confirmLabel,
  busy,
  error,
  danger = true,
  onConfirm,
  onClose,
}: {
  open: boolean;
  title: string;
  children: ReactNode;
  confirmLabel: string;
  busy: boolean;
  error?: unknown;
  danger?: boolean;
  onConfirm: () => void;
  onClose: () => void;
}) {
  return (
    <Dialog
      open={open}
      onClose={onClose}
      title={title}
      footer={
        <>
          <Button variant="secondary" onClick={onClose} data-autofocus="">
            Cancel
          </Button>
          <Button busy={busy} className={danger ? 'bg-fail hover:bg-fail/90 active:bg-fail' : undefined} onClick={onConfirm}>
            {confirmLabel}
          </Button>
        </>
      }
    >
      <div className="space-y-3 text-sm text-ink-700">
        {children}
        {error ? <InlineError error={error} /> : null}
      </div>
    </Dialog>
  );
}
