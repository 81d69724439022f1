import { Button } from '@/components/button';
import { Dialog } from '@/components/dialog';
import { ProgressBar } from '@/components/progress-bar';
import { unfinished, useImpactRun, useLatestImpactRun, useStartImpactRun } from '../api/impact-runs';
import { impactSentence } from '../utils/impact-summary';

/**
 * Approving is the most consequential act: the revision starts judging every new capture.
 * The confirmation quotes the impact run (how many recent builds would change verdict), or
 * says plainly that nobody has run one and offers to, before the reviewer commits.
 */
export function ApproveRevisionDialog({
  open,
  projectKey,
  caseKey,
  revision,
  busy,
  onConfirm,
  onClose,
}: {
  open: boolean;
  projectKey: string;
  caseKey: string;
  revision: number;
  busy: boolean;
  onConfirm: () => void;
  onClose: () => void;
}) {
  const latest = useLatestImpactRun(projectKey, caseKey, revision);
  const start = useStartImpactRun(projectKey, caseKey, revision);
  const current = start.data ?? latest.data ?? null;
  const run = useImpactRun(projectKey, caseKey, revision, current?.id ?? null, current);
  const shown = run.data ?? current;
  const sentence = impactSentence(shown);
  const running = unfinished(shown);

  return (
    <Dialog
      open={open}
      onClose={onClose}
      title={`Approve revision ${revision} of ${caseKey}?`}
      description="Once approved it judges every new capture of this test case, and the revision it replaces is superseded."
      footer={
        <>
          <Button variant="ghost" onClick={onClose}>
            Cancel
          </Button>
          <Button busy={busy} onClick={onConfirm} data-autofocus>
            Approve revision {revision}
          </Button>
        </>
      }
    >
      <div role="note" aria-label="Impact summary" className="space-y-2 rounded-md border border-line-strong bg-paper px-3 py-2.5 text-sm text-ink-900">
        {sentence ? (
          <>
            <p className="font-medium">{sentence}</p>
            {shown?.result?.summary.passToFail ? <p className="text-ink-700">Builds that newly fail turn red on the dashboard as soon as their captures are judged again.</p> : null}
          </>
        ) : running && shown ? (
          <div className="space-y-1.5">
            <p>The impact run is still going; its numbers appear here when it finishes.</p>
            <ProgressBar value={shown.progress} max={Math.max(shown.total, 1)} label={`Impact run of revision ${revision}`} />
          </div>
        ) : shown?.state === 'error' ? (
          <p>The impact run failed ({shown.error ?? 'no reason given'}); nothing says how recent builds would fare.</p>
        ) : (
          <div className="space-y-2">
            <p>No impact run yet: nothing says how recent builds would fare under this revision.</p>
            <Button variant="secondary" className="h-8" busy={start.isPending} onClick={() => start.mutate({ builds: 20 })}>
              Run impact on the last 20 builds
            </Button>
          </div>
        )}
      </div>
    </Dialog>
  );
}
