import { MaskRejectRequest } from '@earmark/contracts';
import { useId, useState } from 'react';
import { Button } from '@/components/button';
import { TextArea } from '@/components/form-controls';
import { InlineError } from '@/components/inline-error';
import { notify } from '@/components/toast';
import { ApiError } from '@/lib/api-error';
import { useDecide, type Decision, type DecisionTarget } from '../api/decide';
import { ApproveRevisionDialog } from './approve-revision-dialog';

function successDetail(target: DecisionTarget, verdict: Decision['verdict']): string {
  if (target.kind === 'revision') {
    return verdict === 'approve' ? `It now judges new captures of ${target.caseKey}.` : 'Its author is told why, with your comment.';
  }
  return verdict === 'approve' ? 'Its finding counts as an accepted deviation until the waiver’s date.' : 'The requester is told why, with your comment.';
}

/**
 * Approve or reject, with a comment (required to reject). Whoever wrote, edited or requested
 * the work cannot decide it (the four-eyes rule): the buttons stay visible but disabled, with
 * the reason beside them, so they know why and who must act.
 */
export function DecisionPanel({
  projectKey,
  target,
  label,
  blockedReason,
}: {
  projectKey: string;
  target: DecisionTarget;
  /** "revision 4 of eq.music.sweep", for the buttons' accessible descriptions. */
  label: string;
  /** Why this user may not decide (they wrote, edited or requested it); null when they may. */
  blockedReason: string | null;
}) {
  const decide = useDecide(projectKey);
  const [comment, setComment] = useState('');
  const [commentError, setCommentError] = useState<string | null>(null);
  const ids = useId();
  const blocked = blockedReason !== null;
  const [confirming, setConfirming] = useState(false);

  // The promise, not mutate()'s callbacks: a decided card leaves the queue (and unmounts) before those would run.
  const send = (decision: Decision) =>
    void decide.mutateAsync({ target, decision }).then(
      () => {
        setConfirming(false);
        notify.success(`${label}: ${decision.verdict === 'approve' ? 'approved' : 'rejected'}`, successDetail(target, decision.verdict));
      },
      (error: unknown) => {
        setConfirming(false);
        notify.error(`${label} was not ${decision.verdict === 'approve' ? 'approved' : 'rejected'}`, error instanceof ApiError ? error.detail : undefined);
      },
    );
  const approve = () => {
    setCommentError(null);
    const trimmed = comment.trim();
    send({ verdict: 'approve', body: trimmed ? { comment: trimmed } : {} });
  };
  const reject = () => {
    const parsed = MaskRejectRequest.safeParse({ comment });
    if (!parsed.success) {
      setCommentError(parsed.error.issues[0]?.message ?? 'say why');
      return;
    }
    setCommentError(null);
    send({ verdict: 'reject', body: { comment: parsed.data.comment } });
  };

  return (
    <div className="space-y-2.5">
      <label htmlFor={`${ids}-comment`} className="block text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
        Comment <span className="normal-case tracking-normal font-normal">(required to reject)</span>
      </label>
      <TextArea
        id={`${ids}-comment`}
        rows={3}
        value={comment}
        disabled={blocked}
        aria-invalid={commentError ? true : undefined}
        aria-describedby={commentError ? `${ids}-error` : undefined}
        onChange={(e) => setComment(e.target.value)}
      />
      {commentError ? (
        <p id={`${ids}-error`} className="text-xs text-fail">
          {commentError}
        </p>
      ) : null}
      <div className="flex flex-wrap gap-2">
        <Button onClick={target.kind === 'revision' ? () => setConfirming(true) : approve} disabled={blocked} busy={decide.isPending && decide.variables?.decision.verdict === 'approve'} aria-describedby={blocked ? `${ids}-blocked` : undefined}>
          Approve
        </Button>
        <Button variant="secondary" onClick={reject} disabled={blocked} busy={decide.isPending && decide.variables?.decision.verdict === 'reject'} aria-describedby={blocked ? `${ids}-blocked` : undefined}>
          Reject
        </Button>
      </div>
      {blocked ? (
        <p id={`${ids}-blocked`} className="flex items-start gap-1.5 text-xs text-ink-700">
          <svg viewBox="0 0 16 16" aria-hidden="true" className="mt-px size-3.5 shrink-0 text-ink-500">
            <rect x="3.5" y="7" width="9" height="7" rx="1.2" fill="none" stroke="currentColor" strokeWidth="1.4" />
            <path d="M5.5 7V5a2.5 2.5 0 0 1 5 0v2" fill="none" stroke="currentColor" strokeWidth="1.4" />
          </svg>
          {blockedReason}
        </p>
      ) : null}
      {decide.error ? <InlineError error={decide.error} /> : null}
      <span className="sr-only">{label}</span>
      {target.kind === 'revision' && confirming ? (
        <ApproveRevisionDialog
          open
          projectKey={projectKey}
          caseKey={target.caseKey}
          revision={target.revision}
          busy={decide.isPending}
          onConfirm={approve}
          onClose={() => setConfirming(false)}
        />
      ) : null}
    </div>
  );
}
