import type { WaiverDto } from '@earmark/contracts';
import { useState } from 'react';
import { Button } from '@/components/button';
import { RelativeTime } from '@/components/relative-time';
import { formatDate } from '@/lib/format';
import { cn } from '@/lib/cn';
import { useLinkedCard, waiverAnchor } from '../utils/linked-card';
import { isRevocable } from '../utils/revocable';
import { RevokeWaiverDialog } from './revoke-waiver-dialog';

/** One approved waiver: what it excuses, until when, who asked and who approved, and "Revoke" where allowed. */
function WaiverInForceCard({ waiver, mayDecideWaivers, onRevoke }: { waiver: WaiverDto; mayDecideWaivers: boolean; onRevoke: (waiver: WaiverDto) => void }) {
  const name = `Waiver in force: ${waiver.checkId} on ${waiver.testCase}`;
  const linked = useLinkedCard(waiverAnchor(waiver.id));
  return (
    <article
      id={waiverAnchor(waiver.id)}
      ref={linked.ref}
      aria-label={name}
      aria-current={linked.current ? 'true' : undefined}
      className={cn(
        'flex scroll-mt-20 flex-wrap items-start justify-between gap-4 rounded-lg border bg-paper-raised px-4 py-3',
        linked.current ? 'border-brass-600 ring-2 ring-brass-300/60' : 'border-line',
      )}
    >
      <div className="min-w-0 space-y-1">
        <h3 className="text-sm font-semibold text-ink-950">
          <span className="font-mono">{waiver.checkId}</span> on <span className="font-mono">{waiver.testCase}</span>
          <span className="font-normal text-ink-600"> · {waiver.target ? <span className="font-mono">{waiver.target}</span> : 'every target'}</span>
        </h3>
        <p className="text-xs text-ink-600">
          {waiver.active ? `Runs until ${formatDate(waiver.until)}` : `Past its date (${formatDate(waiver.until)}); expiring`} · requested by {waiver.requestedBy}
          {waiver.decidedBy ? <> · approved by {waiver.decidedBy}</> : null}
          {waiver.decidedAt ? (
            <>
              {' '}
              <RelativeTime iso={waiver.decidedAt} />
            </>
          ) : null}
        </p>
        <p className="whitespace-pre-wrap text-sm text-ink-800">{waiver.reason}</p>
      </div>
      {isRevocable(waiver, mayDecideWaivers) ? (
        <Button variant="secondary" onClick={() => onRevoke(waiver)}>
          Revoke
        </Button>
      ) : null}
    </article>
  );
}

/** The approved waivers; someone who may decide waivers can revoke one still in force, with a reason. */
export function WaiversInForce({ projectKey, waivers, mayDecideWaivers }: { projectKey: string; waivers: WaiverDto[]; mayDecideWaivers: boolean }) {
  const [revoking, setRevoking] = useState<WaiverDto | null>(null);
  return (
    <>
      <div className="space-y-3">
        {waivers.map((w) => (
          <WaiverInForceCard key={w.id} waiver={w} mayDecideWaivers={mayDecideWaivers} onRevoke={setRevoking} />
        ))}
      </div>
      <RevokeWaiverDialog projectKey={projectKey} waiver={revoking} onClose={() => setRevoking(null)} />
    </>
  );
}
