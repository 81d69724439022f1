import { Session, type ChangePasswordRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { sessionStore } from '@/lib/session-store';
import { meQueryKey } from '@/features/auth/api/get-me';

export function changePassword(body: ChangePasswordRequest): Promise<Session> {
  return apiRequest('/api/me/password', { method: 'PUT', body, schema: Session });
}

/**
 * The API ends every session of the user, this one's tokens included, and answers a fresh
 * session: keeping it is what leaves this tab signed in while every other device is signed out.
 */
export function useChangePassword() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: changePassword,
    onSuccess: (session) => {
      sessionStore.set({ accessToken: session.accessToken, refreshToken: session.refreshToken });
      queryClient.setQueryData(meQueryKey, session.user);
    },
  });
}
