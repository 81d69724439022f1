import { RequestWaiverRequest, type FindingRow } from '@earmark/contracts';
import { useId, useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { TextArea, TextInput } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';
import { paths } from '@/lib/paths';
import { useRequestWaiver } from '../api/request-waiver';

const inDays = (days: number) => new Date(Date.now() + days * 86_400_000).toISOString().slice(0, 10);

/** A second request refused (409): the API's words, and a link to the waiver that already exists (no id shown). */
function ExistingWaiverNotice({ projectKey, error }: { projectKey: string; error: ApiError }) {
  const existing = error.existing;
  if (!existing) return null;
  return (
    <div role="alert" className="space-y-1.5 rounded-md border border-line-strong bg-paper px-3 py-2.5 text-sm text-ink-900">
      <p className="font-semibold">A waiver for this check already exists</p>
      <p className="text-ink-700">{error.detail}</p>
      <Link to={`${paths.approvals(projectKey)}#waiver-${existing.id}`} className="inline-block font-medium text-ink-900 underline underline-offset-2">
        {existing.state === 'requested' ? 'Open the waiver awaiting review' : 'Open the waiver in force'}
      </Link>
    </div>
  );
}

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
    const what = `${finding.checkId} on ${finding.testCase}`;
    request.mutate(
      { findingId: finding.id, body: parsed.data },
      {
        onSuccess: () => {
          notify.success(`Waiver of ${what} requested`, 'The project’s QA managers are mailed; one of them decides under Approvals.');
          close();
        },
        onError: (error) => notify.error(`The waiver of ${what} was not requested`, error instanceof ApiError ? error.detail : undefined),
      },
    );
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
        {request.error instanceof ApiError && request.error.existing?.kind === 'waiver' ? (
          <ExistingWaiverNotice projectKey={projectKey} error={request.error} />
        ) : request.error ? (
          <InlineError error={request.error} />
        ) : null}
      </form>
    </Dialog>
  );
}
