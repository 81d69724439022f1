import { WaiverRevokeRequest, type WaiverDto } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { TextArea } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';
import { useRevokeWaiver } from '../api/revoke-waiver';

/**
 * Take an approved waiver back before its date, with a reason (required). It says plainly
 * what follows: the checks it covered count as failures again at once.
 */
export function RevokeWaiverDialog({ projectKey, waiver, onClose }: { projectKey: string; waiver: WaiverDto | null; onClose: () => void }) {
  const ids = useId();
  const [reason, setReason] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const revoke = useRevokeWaiver(projectKey);
  const close = () => {
    setReason('');
    setProblem(null);
    revoke.reset();
    onClose();
  };
  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    if (!waiver) return;
    const parsed = WaiverRevokeRequest.safeParse({ reason });
    if (!parsed.success) {
      setProblem(parsed.error.issues.map((i) => i.message).join('; '));
      return;
    }
    setProblem(null);
    const what = `${waiver.checkId} on ${waiver.testCase}`;
    revoke.mutate(
      { waiverId: waiver.id, body: parsed.data },
      {
        onSuccess: () => {
          notify.success(`Waiver of ${what} revoked`, 'The captures it covered are judged again now; the requester is mailed.');
          close();
        },
        onError: (error) => notify.error(`The waiver of ${what} was not revoked`, error instanceof ApiError ? error.detail : undefined),
      },
    );
  };
  return (
    <Dialog
      open={waiver !== null}
      onClose={close}
      title="Revoke waiver"
      description={waiver ? `${waiver.checkId} on ${waiver.testCase} · ${waiver.target ?? 'every target'}` : undefined}
      footer={
        <>
          <Button variant="ghost" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" form={`${ids}-form`} busy={revoke.isPending}>
            Revoke waiver
          </Button>
        </>
      }
    >
      <form id={`${ids}-form`} onSubmit={onSubmit} className="space-y-4" noValidate>
        <p role="note" className="rounded-md border border-line-strong bg-fail-soft/35 px-3 py-2 text-[13px] text-ink-900">
          The checks it covers count as failures again at once: the captures it covered are judged again now and their builds can fail. The requester and
          the finding’s assignee are mailed.
        </p>
        <div>
          <label htmlFor={`${ids}-reason`} className="mb-1.5 block text-sm font-medium text-ink-800">
            Reason
          </label>
          <TextArea
            id={`${ids}-reason`}
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            placeholder="Why does this deviation no longer count as accepted?"
            aria-invalid={problem ? true : undefined}
            className="w-full"
          />
        </div>
        {problem ? <p className="text-[13px] text-fail">{problem}</p> : null}
        {revoke.error ? <InlineError error={revoke.error} /> : null}
      </form>
    </Dialog>
  );
}
