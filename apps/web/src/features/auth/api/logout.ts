import { useMutation } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { sessionStore } from '@/lib/session-store';

export async function logout(): Promise<void> {
  if (!sessionStore.getTokens()) return;
  try {
    // With an expired access token the client refreshes first, so the API can still
    // revoke the refresh tokens; that is the point of signing out.
    await apiRequest('/api/auth/logout', { method: 'POST' });
  } catch {
    // Revocation is best effort: the user asked to leave, so leave even if the API is down.
  } finally {
    sessionStore.clear('signed-out');
  }
}

export function useLogout() {
  return useMutation({ mutationFn: logout });
}
