import { MemberRow, type ProjectRole } from '@earmark/contracts';
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const MemberList = z.object({ items: z.array(MemberRow) });
const membersKey = (projectKey: string) => ['projects', projectKey, 'members'] as const;

export function getProjectMembersQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: membersKey(projectKey),
    queryFn: async ({ signal }) => (await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/members`, { schema: MemberList, signal })).items,
  });
}

export function useProjectMembers(projectKey: string) {
  return useQuery(getProjectMembersQueryOptions(projectKey));
}

/** Adds a person with a role, or changes the role of a member. */
export function useSetMember(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; role: ProjectRole }) =>
      apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/members`, { method: 'PUT', body, schema: MemberRow }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membersKey(projectKey) }),
  });
}

export function useRemoveMember(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/members/${encodeURIComponent(userId)}`, { method: 'DELETE' }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: membersKey(projectKey) }),
  });
}
