import { AccountLinkSent, InvitedUser, UserRow, type InviteUserRequest, type UpdateUserRequest } from '@earmark/contracts';
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const UserList = z.object({ items: z.array(UserRow) });
export const usersQueryKey = ['admin', 'users'] as const;

export function getUsersQueryOptions() {
  return queryOptions({
    queryKey: usersQueryKey,
    queryFn: async ({ signal }) => (await apiRequest('/api/admin/users', { schema: UserList, signal })).items,
  });
}

export function useUsers() {
  return useQuery(getUsersQueryOptions());
}

export function useInviteUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InviteUserRequest) => apiRequest('/api/admin/users/invitations', { method: 'POST', body, schema: InvitedUser }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, change }: { userId: string; change: UpdateUserRequest }) =>
      apiRequest(`/api/admin/users/${encodeURIComponent(userId)}`, { method: 'PATCH', body: change, schema: UserRow }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: usersQueryKey }),
  });
}

export function useSendPasswordReset() {
  return useMutation({
    mutationFn: (userId: string) => apiRequest(`/api/admin/users/${encodeURIComponent(userId)}/password-reset`, { method: 'POST', schema: AccountLinkSent }),
  });
}
