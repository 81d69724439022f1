import { Session, type LoginRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { sessionStore } from '@/lib/session-store';
import { meQueryKey } from './get-me';

export function login(credentials: LoginRequest): Promise<Session> {
  // auth: false because a 401 here means wrong credentials, not an expired session.
  return apiRequest('/api/auth/login', { method: 'POST', body: credentials, schema: Session, auth: false });
}

export function useLogin(options: { onSuccess?: (session: Session) => void } = {}) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: login,
    onSuccess: (session) => {
      // Whatever a previous user left in the cache must not leak into this session.
      queryClient.clear();
      sessionStore.set({ accessToken: session.accessToken, refreshToken: session.refreshToken });
      // The session already says who signed in; no need to ask /api/me again right away.
      queryClient.setQueryData(meQueryKey, session.user);
      options.onSuccess?.(session);
    },
  });
}
