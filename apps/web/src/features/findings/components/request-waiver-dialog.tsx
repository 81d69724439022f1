import { RequestWaiverRequest, type FindingRow } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { TextArea, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { useRequestWaiver } from '../api/request-waiver';

const inDays = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);

/**
 * Request a waiver for a finding: the failing check counts as "passed with waiver" until the
 * date, once a QA manager other than you approves it. Expiry re-opens the finding.
 */
export function RequestWaiverDialog({ projectKey, finding, onClose }: { projectKey: string; finding: FindingRow | null; onClose: () => void }) {
  const ids = useId();
  const [reason, setReason] = useState('');
  const [until, setUntil] = useState(inDays(30));
  const [targetOnly, setTargetOnly] = useState(true);
  const [problem, setProblem] = useState<string | null>(null);
  const request = useRequestWaiver(projectKey);
  const close = () => {
    setReason('');
    setProblem(null);
    request.reset();
    onClose();
  };
  const onSubmit = (event: FormEvent) => {
    event.preventDefault();
    if (!finding) return;
    const parsed = RequestWaiverRequest.safeParse({ reason, until, targetOnly });
    if (!parsed.success) {
      setProblem(parsed.error.issues.map((i) => i.message).join('; '));
      return;
    }
    setProblem(null);
    request.mutate({ findingId: finding.id, body: parsed.data }, { onSuccess: close });
  };
  return (
    <Dialog
      open={finding !== null}
      onClose={close}
      title="Request a waiver"
      description={finding ? `${finding.checkId} on ${finding.testCase} · ${finding.target}` : undefined}
      footer={
        <>
          <Button variant="ghost" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" form={`${ids}-form`} busy={request.isPending}>
            Send for approval
          </Button>
        </>
      }
    >
      <form id={`${ids}-form`} onSubmit={onSubmit} className="space-y-4" noValidate>
        <div>
          <label htmlFor={`${ids}-reason`} className="mb-1.5 block text-sm font-medium text-ink-800">
            Reason
          </label>
          <TextArea id={`${ids}-reason`} value={reason} onChange={(e) => setReason(e.target.value)} placeholder="Why is this deviation acceptable until the date?" className="w-full" />
        </div>
        <div className="flex flex-wrap items-end gap-4">
          <div>
            <label htmlFor={`${ids}-until`} className="mb-1.5 block text-sm font-medium text-ink-800">
              Until
            </label>
            <TextInput id={`${ids}-until`} type="date" value={until} min={inDays(1)} onChange={(e) => setUntil(e.target.value)} />
          </div>
          <label className="flex items-center gap-2 pb-2 text-sm text-ink-800">
            <input type="checkbox" className="size-4 accent-ink-900" checked={targetOnly} onChange={(e) => setTargetOnly(e.target.checked)} />
            Only target {finding?.target}
          </label>
        </div>
        <p className="text-xs text-ink-600">A QA manager other than you decides. While approved, the check counts as passed with waiver; when it expires the finding re-opens.</p>
        {problem ? <p className="text-[13px] text-fail">{problem}</p> : null}
        {request.error ? <InlineError error={request.error} /> : null}
      </form>
    </Dialog>
  );
}
