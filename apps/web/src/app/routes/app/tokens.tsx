import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useParams } from 'react-router';
import { Button } from '@/components/button';
import { EmptyState } from '@/components/empty-state';
import { ErrorState } from '@/components/error-state';
import { PageHeader } from '@/components/page-header';
import { ProjectBreadcrumb } from '@/components/project-breadcrumb';
import { getMeQueryOptions } from '@/features/auth/api/get-me';
import { getTokensQueryOptions, useTokens } from '@/features/tokens/api/get-tokens';
import { CreateTokenDialog } from '@/features/tokens/components/create-token-dialog';
import { TokensTable, TokensTableSkeleton } from '@/features/tokens/components/tokens-table';
import { abilitiesIn, useProjectAbilities } from '@/lib/authorization';
import { requireSession } from '../require-session';

export const tokensLoader = (queryClient: QueryClient) =>
  requireSession(async ({ params }) => {
    if (!params.projectKey) throw new Error('projectKey route parameter is missing');
    // Loaders run in parallel with the shell's, so ask for the user here too (a cache hit after the first).
    const me = await queryClient.ensureQueryData(getMeQueryOptions());
    if (abilitiesIn(me, params.projectKey).canAdminister) {
      await queryClient.ensureQueryData(getTokensQueryOptions(params.projectKey));
    }
    return null;
  });

function TokensContent({ projectKey }: { projectKey: string }) {
  const tokens = useTokens(projectKey);
  if (tokens.isPending) return <TokensTableSkeleton />;
  if (tokens.isError) return <ErrorState error={tokens.error} onRetry={() => void tokens.refetch()} />;
  if (tokens.data.length === 0) {
    return (
      <EmptyState title="No API tokens yet">
        CI pipelines need a token to submit builds and read verdicts. Create one per pipeline so each can be revoked on its own.
      </EmptyState>
    );
  }
  return <TokensTable projectKey={projectKey} tokens={tokens.data} />;
}

export function TokensRoute() {
  const { projectKey = '' } = useParams();
  const { canAdminister } = useProjectAbilities(projectKey);
  const [creating, setCreating] = useState(false);

  return (
    <div className="space-y-5">
      <title>{`API tokens · ${projectKey} · Earmark`}</title>
      <PageHeader
        eyebrow={<ProjectBreadcrumb projectKey={projectKey} />}
        title="API tokens"
        description="Bearer tokens for CI pipelines of this project. A token's secret is shown once, when it is created."
        actions={canAdminister ? <Button onClick={() => setCreating(true)}>Create token</Button> : null}
      />
      {canAdminister ? (
        <>
          <TokensContent projectKey={projectKey} />
          <CreateTokenDialog projectKey={projectKey} open={creating} onClose={() => setCreating(false)} />
        </>
      ) : (
        <EmptyState title="Only administrators manage API tokens">
          Ask an Earmark administrator for a token for your pipeline, or to revoke one.
        </EmptyState>
      )}
    </div>
  );
}
