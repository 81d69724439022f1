import type { ReactNode } from 'react';
import type { QueryClient } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { Skeleton } from '@/components/skeleton';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { getApprovedWaiversQueryOptions, useApprovedWaivers } from '@/features/approvals/api/get-approved-waivers';
import { getRequestedWaiversQueryOptions, useRequestedWaivers } from '@/features/approvals/api/get-requested-waivers';
import { getReviewQueueQueryOptions, useReviewQueue } from '@/features/approvals/api/get-review-queue';
import { RevisionReviewCard, WaiverReviewCard } from '@/features/approvals/components/review-cards';
import { WaiversInForce } from '@/features/approvals/components/waivers-in-force';
import { abilitiesIn, useCurrentUser, useProjectAbilities } from '@/lib/authorization';
import { formatCount } from '@/lib/format';
import { requireSession } from '../require-session';

export const approvalsLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    const me = await queryClient.ensureQueryData(getMeQueryOptions());
    // Every member reads the waivers (a "waiver already requested" link lands here); QA managers also get the revision queue.
    void queryClient.prefetchQuery(getRequestedWaiversQueryOptions(params.projectKey));
    void queryClient.prefetchQuery(getApprovedWaiversQueryOptions(params.projectKey));
    if (abilitiesIn(me, params.projectKey).canApprove) {
      await queryClient.ensureQueryData(getReviewQueueQueryOptions(params.projectKey));
    }
    return null;
  });

function Section({ title, count, children }: { title: string; count: number | null; children: ReactNode }) {
  return (
    <section className="space-y-3">
      <h2 className="flex items-baseline gap-2 text-sm font-semibold uppercase tracking-[0.07em] text-ink-600">
        {title}
        {count !== null ? <span className="font-mono text-xs font-normal tracking-normal text-ink-500">{formatCount(count)}</span> : null}
      </h2>
      {children}
    </section>
  );
}

function Queues({ projectKey }: { projectKey: string }) {
  const me = useCurrentUser();
  const revisions = useReviewQueue(projectKey);
  const waivers = useRequestedWaivers(projectKey);
  const approved = useApprovedWaivers(projectKey);
  const { canApprove } = useProjectAbilities(projectKey);
  const email = me?.email ?? null;
  return (
    <div className="space-y-8">
      <Section title="Mask revisions in review" count={revisions.data?.length ?? null}>
        {revisions.isPending ? (
          <Skeleton className="h-40 rounded-lg" />
        ) : revisions.isError ? (
          <ErrorState error={revisions.error} onRetry={() => void revisions.refetch()} />
        ) : revisions.data.length === 0 ? (
          <EmptyState title="No revisions waiting">Engineers submit drafts from a test case’s masks; they appear here for review.</EmptyState>
        ) : (
          <div className="space-y-4">
            {revisions.data.map((r) => (
              <RevisionReviewCard key={r.id} projectKey={projectKey} revision={r} myEmail={email} />
            ))}
          </div>
        )}
      </Section>
      <Section title="Waivers requested" count={waivers.data?.length ?? null}>
        {waivers.isPending ? (
          <Skeleton className="h-32 rounded-lg" />
        ) : waivers.isError ? (
          <ErrorState error={waivers.error} onRetry={() => void waivers.refetch()} />
        ) : waivers.data.length === 0 ? (
          <EmptyState title="No waivers requested">Waivers are requested from a failing finding and expire on their date.</EmptyState>
        ) : (
          <div className="space-y-4">
            {waivers.data.map((w) => (
              <WaiverReviewCard key={w.id} projectKey={projectKey} waiver={w} myEmail={email} />
            ))}
          </div>
        )}
      </Section>
      <Section title="Waivers in force" count={approved.data?.length ?? null}>
        {approved.isPending ? (
          <Skeleton className="h-24 rounded-lg" />
        ) : approved.isError ? (
          <ErrorState error={approved.error} onRetry={() => void approved.refetch()} />
        ) : approved.data.length === 0 ? (
          <EmptyState title="No waivers in force">An approved waiver shows here until its date; revoke it to make its check fail builds again.</EmptyState>
        ) : (
          <WaiversInForce projectKey={projectKey} waivers={approved.data} mayDecideWaivers={canApprove} />
        )}
      </Section>
    </div>
  );
}

/** Members who may not decide still see which waivers are requested and in force (read-only). */
function WaiversToRead({ projectKey }: { projectKey: string }) {
  const me = useCurrentUser();
  const waivers = useRequestedWaivers(projectKey);
  const approved = useApprovedWaivers(projectKey);
  const email = me?.email ?? null;
  return (
    <div className="space-y-8">
      <Section title="Waivers requested" count={waivers.data?.length ?? null}>
        {waivers.isPending ? (
          <Skeleton className="h-32 rounded-lg" />
        ) : waivers.isError ? (
          <ErrorState error={waivers.error} onRetry={() => void waivers.refetch()} />
        ) : waivers.data.length === 0 ? (
          <EmptyState title="No waivers requested">Waivers are requested from a failing finding and expire on their date.</EmptyState>
        ) : (
          <div className="space-y-4">
            {waivers.data.map((w) => (
              <WaiverReviewCard key={w.id} projectKey={projectKey} waiver={w} myEmail={email} mayDecide={false} />
            ))}
          </div>
        )}
      </Section>
      <Section title="Waivers in force" count={approved.data?.length ?? null}>
        {approved.isPending ? (
          <Skeleton className="h-24 rounded-lg" />
        ) : approved.isError ? (
          <ErrorState error={approved.error} onRetry={() => void approved.refetch()} />
        ) : approved.data.length === 0 ? (
          <EmptyState title="No waivers in force">An approved waiver shows here until its date.</EmptyState>
        ) : (
          <WaiversInForce projectKey={projectKey} waivers={approved.data} mayDecideWaivers={false} />
        )}
      </Section>
    </div>
  );
}

export function ApprovalsRoute() {
  const { projectKey = '' } = useParams();
  const { canApprove } = useProjectAbilities(projectKey);
  return (
    <div className="space-y-6">
      <title>{`Approvals · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Approvals"
        description="Mask revisions and waivers waiting for a QA manager. Nobody decides on what they asked for themselves."
      />
      {canApprove ? (
        <Queues projectKey={projectKey} />
      ) : (
        <>
          <EmptyState title="Only QA managers and administrators approve">Ask a QA manager of this project to review your revision or waiver.</EmptyState>
          <WaiversToRead projectKey={projectKey} />
        </>
      )}
    </div>
  );
}
