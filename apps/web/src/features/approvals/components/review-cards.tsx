import type { MaskRevisionDto, WaiverDto } from '@earmark/contracts';
import { Link } from 'react-router';
import { RelativeTime } from '@/components/relative-time';
import { RevisionStateBadge } from '@/components/revision-state-badge';
import { formatDate } from '@/lib/format';
import { paths } from '@/lib/paths';
import { revisionReviewBlock } from '../utils/review-block';
import { DecisionPanel } from './decision-panel';
import { ImpactPanel } from './impact-panel';
import { RevisionChanges } from './revision-changes';
import { cn } from '@/lib/cn';
import { useLinkedCard, waiverAnchor } from '../utils/linked-card';

/** A revision in review: what it is, its impact table, and the decision beside it. */
export function RevisionReviewCard({ projectKey, revision, myEmail }: { projectKey: string; revision: MaskRevisionDto; myEmail: string | null }) {
  const name = `Revision ${revision.revision} of ${revision.testCase}`;
  return (
    <article aria-label={name} className="rounded-lg border border-line bg-paper-raised">
      <header className="flex flex-wrap items-start justify-between gap-3 border-b border-line px-4 py-3">
        <div className="min-w-0">
          <h3 className="flex flex-wrap items-center gap-2 text-base font-semibold text-ink-950">
            <Link to={paths.masks(projectKey, revision.testCase, `rev=${revision.revision}&compare=1`)} className="underline-offset-2 hover:underline">
              <span className="font-mono">{revision.testCase}</span> · revision {revision.revision}
            </Link>
            <RevisionStateBadge state={revision.state} />
          </h3>
          <p className="mt-0.5 text-xs text-ink-600">
            {revision.checks.length} checks · {revision.target ? <span className="font-mono">{revision.target}</span> : 'all targets'} · drafted by {revision.author}{' '}
            <RelativeTime iso={revision.createdAt} />
          </p>
          {revision.note ? <p className="mt-1.5 max-w-2xl text-sm text-ink-800">{revision.note}</p> : null}
        </div>
      </header>
      <div className="border-b border-line px-4 py-4">
        <RevisionChanges projectKey={projectKey} revision={revision} />
      </div>
      <div className="grid grid-cols-[minmax(0,1fr)] gap-6 px-4 py-4 lg:grid-cols-[minmax(0,1fr)_280px]">
        <ImpactPanel projectKey={projectKey} caseKey={revision.testCase} revision={revision.revision} canRun />
        <DecisionPanel
          projectKey={projectKey}
          target={{ kind: 'revision', caseKey: revision.testCase, revision: revision.revision }}
          label={name}
          blockedReason={revisionReviewBlock(revision, myEmail)}
        />
      </div>
    </article>
  );
}

/** A waiver request: the check it excuses, until when and why, and the decision beside it. */
export function WaiverReviewCard({
  projectKey,
  waiver,
  myEmail,
  mayDecide = true,
}: {
  projectKey: string;
  waiver: WaiverDto;
  myEmail: string | null;
  /** False for members who may only read (the card a "waiver already requested" link opens). */
  mayDecide?: boolean;
}) {
  const mine = myEmail !== null && waiver.requestedBy === myEmail;
  const name = `Waiver of ${waiver.checkId} on ${waiver.testCase}`;
  const linked = useLinkedCard(waiverAnchor(waiver.id));
  return (
    <article
      id={waiverAnchor(waiver.id)}
      ref={linked.ref}
      aria-label={name}
      aria-current={linked.current ? 'true' : undefined}
      className={cn('scroll-mt-20 rounded-lg border bg-paper-raised', linked.current ? 'border-brass-600 ring-2 ring-brass-300/60' : 'border-line')}
    >
      <div className={cn('grid grid-cols-[minmax(0,1fr)] gap-6 px-4 py-4', mayDecide && 'lg:grid-cols-[minmax(0,1fr)_280px]')}>
        <div className="min-w-0 space-y-2">
          <h3 className="text-base font-semibold text-ink-950">
            Waive <span className="font-mono">{waiver.checkId}</span> on <span className="font-mono">{waiver.testCase}</span>
          </h3>
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-ink-500">Targets</dt>
            <dd className="font-mono text-[13px]">{waiver.target ?? 'every target'}</dd>
            <dt className="text-ink-500">Until</dt>
            <dd>{formatDate(waiver.until)}</dd>
            <dt className="text-ink-500">Requested</dt>
            <dd>
              {waiver.requestedBy} <RelativeTime iso={waiver.createdAt} className="text-ink-500" />
            </dd>
            <dt className="text-ink-500">Reason</dt>
            <dd className="whitespace-pre-wrap text-ink-800">{waiver.reason}</dd>
          </dl>
          {waiver.findingId ? (
            <Link to={paths.findings(projectKey)} className="inline-block text-sm font-medium text-ink-700 underline underline-offset-2">
              Open the findings queue
            </Link>
          ) : null}
        </div>
        {mayDecide ? (
          <DecisionPanel
            projectKey={projectKey}
            target={{ kind: 'waiver', id: waiver.id }}
            label={name}
            blockedReason={mine ? 'You requested this waiver; another QA manager must approve it' : null}
          />
        ) : null}
      </div>
    </article>
  );
}
