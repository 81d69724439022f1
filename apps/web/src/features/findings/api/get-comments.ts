import { CommentRow } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';
import { commentsKey } from './keys';

const CommentList = z.object({ items: z.array(CommentRow) });

export async function getComments(projectKey: string, findingId: string, signal?: AbortSignal): Promise<CommentRow[]> {
  const { items } = await apiRequest(
    `/api/projects/${encodeURIComponent(projectKey)}/findings/${encodeURIComponent(findingId)}/comments`,
    { schema: CommentList, signal },
  );
  return items;
}

export function getCommentsQueryOptions(projectKey: string, findingId: string) {
  return queryOptions({
    queryKey: commentsKey(projectKey, findingId),
    queryFn: ({ signal }) => getComments(projectKey, findingId, signal),
  });
}

export function useComments(projectKey: string, findingId: string | null) {
  return useQuery({ ...getCommentsQueryOptions(projectKey, findingId ?? ''), enabled: findingId !== null });
}
