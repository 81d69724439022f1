import { CommentRow, type CreateCommentRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { findingsKeyRoot } from './keys';

export function addComment(projectKey: string, findingId: string, body: CreateCommentRequest): Promise<CommentRow> {
  return apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/findings/${encodeURIComponent(findingId)}/comments`, {
    method: 'POST',
    body,
    schema: CommentRow,
  });
}

export function useAddComment(projectKey: string, findingId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateCommentRequest) => addComment(projectKey, findingId, body),
    // The comment list and the rows' comment counts both change.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: findingsKeyRoot(projectKey) }),
  });
}
