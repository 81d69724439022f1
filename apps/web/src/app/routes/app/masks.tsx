import { isEngineSelfTest, type MaskCheck } from '@earmark/contracts';
import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useParams, useSearchParams } from 'react-router';
import { Button } from '@/components/button';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { Skeleton } from '@/components/skeleton';
import { notify } from '@/components/toast';
import { getMaskRevisionsQueryOptions, useMaskRevisions } from '@/features/masks/api/get-mask-revisions';
import { getTestCaseQueryOptions, useTestCase } from '@/features/masks/api/get-test-case';
import { MaskWorkspace } from '@/features/masks/components/mask-workspace';
import { RevisionDiff } from '@/features/masks/components/revision-diff';
import { RevisionsTable } from '@/features/masks/components/revisions-table';
import { useProjectAbilities } from '@/lib/authorization';
import { paths } from '@/lib/paths';
import { requireSession } from '../require-session';

export const masksLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey || !params.caseKey) throw new Error('projectKey and caseKey route parameters are missing');
    void queryClient.prefetchQuery(getTestCaseQueryOptions(params.projectKey, params.caseKey));
    await queryClient.ensureQueryData(getMaskRevisionsQueryOptions(params.projectKey, params.caseKey));
    return null;
  });

/** A new draft that is not saved yet; the nonce restarts the editor when another is begun. */
type UnsavedDraft = { checks: MaskCheck[]; nonce: number };

export function MasksRoute() {
  const { projectKey = '', caseKey = '' } = useParams();
  const [search, setSearch] = useSearchParams();
  const revisions = useMaskRevisions(projectKey, caseKey);
  const testCase = useTestCase(projectKey, caseKey);
  const { canDraftMasks } = useProjectAbilities(projectKey);
  const [unsaved, setUnsaved] = useState<UnsavedDraft | null>(null);

  const title = `Masks — ${caseKey}`;
  const eyebrow = <ProjectBreadcrumb projectKey={projectKey} section={{ label: 'Test cases', to: paths.testCases(projectKey) }} />;
  const description = testCase.data ? `${testCase.data.name}. Revisions of the tolerance mask this test case's captures are held to.` : 'Revisions of the tolerance mask this test case’s captures are held to.';

  const items = revisions.data ?? [];
  const approved = items.find((r) => r.state === 'approved' && r.target === null) ?? items.find((r) => r.state === 'approved') ?? null;
  const revParam = Number(search.get('rev'));
  const selected = items.find((r) => r.revision === revParam) ?? items.find((r) => r.state === 'draft') ?? approved ?? items[0] ?? null;
  const comparing = search.get('compare') === '1' && selected !== null;
  const baseParam = search.get('base');

  const openRevision = (revision: number) => {
    setUnsaved(null);
    setSearch({ rev: String(revision) });
  };
  const startDraft = (checks: MaskCheck[]) => {
    // A stored mask may hold the engine self-test (from before it was refused); a new draft starts without it.
    const kept = checks.filter((check) => !isEngineSelfTest(check));
    if (kept.length < checks.length) notify.info('The engine self-test was left out', 'It checks the analysis, not the firmware, so a new revision cannot hold it.');
    setUnsaved({ checks: kept, nonce: Date.now() });
  };

  let body;
  if (revisions.isPending) {
    body = <Skeleton className="h-48 rounded-lg" />;
  } else if (revisions.isError) {
    body = <ErrorState error={revisions.error} onRetry={() => void revisions.refetch()} />;
  } else {
    body = (
      <div className="space-y-6">
        {items.length === 0 && !unsaved ? (
          <EmptyState title="No mask for this test case yet">
            {canDraftMasks
              ? 'Start a draft with “New draft”, or derive limits from passing captures; a QA manager approves it before it gates builds.'
              : 'Engineers draft masks and QA managers approve them. Until one is approved, captures of this test case are analysed without a verdict.'}
          </EmptyState>
        ) : (
          <RevisionsTable
            revisions={items}
            selected={unsaved ? null : (selected?.revision ?? null)}
            hrefFor={(revision) => paths.masks(projectKey, caseKey, `rev=${revision}`)}
          />
        )}
        {unsaved ? (
          <MaskWorkspace
            key={`unsaved-${unsaved.nonce}`}
            projectKey={projectKey}
            caseKey={caseKey}
            source={{ unsaved: { checks: unsaved.checks, note: '', target: null } }}
            canDraft={canDraftMasks}
            onOpenRevision={openRevision}
            onStartDraft={startDraft}
          />
        ) : selected ? (
          <>
            <div className="flex justify-end">
              <Button
                variant="ghost"
                aria-pressed={comparing}
                onClick={() => setSearch(comparing ? { rev: String(selected.revision) } : { rev: String(selected.revision), compare: '1' })}
                disabled={items.length < 2}
              >
                {comparing ? 'Hide changes' : 'Compare revisions'}
              </Button>
            </div>
            {comparing ? (
              <RevisionDiff
                projectKey={projectKey}
                caseKey={caseKey}
                head={selected.revision}
                base={baseParam ? Number(baseParam) : null}
                revisions={items}
                onBaseChange={(base) =>
                  setSearch(base === null ? { rev: String(selected.revision), compare: '1' } : { rev: String(selected.revision), compare: '1', base: String(base) })
                }
              />
            ) : null}
            <MaskWorkspace
              key={`${selected.id}-${selected.state}-${selected.checks.length}-${selected.note.length}`}
              projectKey={projectKey}
              caseKey={caseKey}
              source={{ revision: selected }}
              canDraft={canDraftMasks}
              onOpenRevision={openRevision}
              onStartDraft={startDraft}
            />
          </>
        ) : null}
      </div>
    );
  }

  return (
    <div className="space-y-6">
      <title>{`${title} · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={eyebrow}
        title={title}
        description={description}
        actions={
          canDraftMasks ? (
            <Button onClick={() => startDraft(approved?.checks ?? [])} disabled={revisions.isPending}>
              New draft
            </Button>
          ) : null
        }
      />
      {body}
    </div>
  );
}
