import type { TestCaseDto } from '@earmark/contracts';
import type { QueryClient } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { useParams } from 'react-router';
import { Button } from '@/components/button';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { getTestCasesQueryOptions, useTestCases } from '@/features/test-cases/api/get-test-cases';
import { LoudnessCaution } from '@/features/test-cases/components/stimulus-download';
import { TestCaseDialog } from '@/features/test-cases/components/test-case-dialog';
import { TestCasesTable, TestCasesTableSkeleton } from '@/features/test-cases/components/test-cases-table';
import { useProjectAbilities } from '@/lib/authorization';
import { requireSession } from '../require-session';

export const testCasesLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    await queryClient.ensureQueryData(getTestCasesQueryOptions(params.projectKey));
    return null;
  });

/** The dialog is keyed by what it edits, so opening it again starts from that test case's values. */
type Editing = { testCase: TestCaseDto | null; nonce: number } | null;

export function TestCasesRoute() {
  const { projectKey = '' } = useParams();
  const testCases = useTestCases(projectKey);
  const { canConfigure } = useProjectAbilities(projectKey);
  const [editing, setEditing] = useState<Editing>(null);
  const cautionId = useId();

  let content;
  if (testCases.isPending) content = <TestCasesTableSkeleton />;
  else if (testCases.isError) content = <ErrorState error={testCases.error} onRetry={() => void testCases.refetch()} />;
  else if (testCases.data.length === 0) {
    content = (
      <EmptyState title="No test cases yet">
        {canConfigure
          ? 'Add one to say which signal the rigs play; captures and masks hang off it.'
          : 'Engineers and QA managers of this project add test cases; ask one of them.'}
      </EmptyState>
    );
  } else {
    content = (
      <div className="space-y-3">
        <LoudnessCaution id={cautionId} className="rounded-md border border-brass-200 bg-brass-50 px-3 py-2" />
        <TestCasesTable
          projectKey={projectKey}
          testCases={testCases.data}
          canConfigure={canConfigure}
          cautionId={cautionId}
          onEdit={(testCase) => setEditing({ testCase, nonce: Date.now() })}
        />
      </div>
    );
  }

  return (
    <div className="space-y-5">
      <title>{`Test cases · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="Test cases"
        description="The signals rigs play, how their captures are analysed, and the masks they are held to."
        actions={canConfigure ? <Button onClick={() => setEditing({ testCase: null, nonce: Date.now() })}>New test case</Button> : null}
      />
      {content}
      {editing ? (
        <TestCaseDialog
          key={`${editing.testCase?.key ?? 'new'}-${editing.nonce}`}
          projectKey={projectKey}
          testCase={editing.testCase}
          open
          onClose={() => setEditing(null)}
        />
      ) : null}
    </div>
  );
}
