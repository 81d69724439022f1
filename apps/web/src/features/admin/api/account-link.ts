import { AccountLinkInfo } from '@earmark/contracts';
import { queryOptions, useMutation, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';

/** Who a mailed invitation or reset link is for; the API answers 410 with the reason once it no longer works. */
export function getAccountLinkQueryOptions(secret: string) {
  return queryOptions({
    queryKey: ['account-link', secret] as const,
    queryFn: ({ signal }) => apiRequest(`/api/account-links/${encodeURIComponent(secret)}`, { schema: AccountLinkInfo, signal, auth: false }),
    retry: false,
  });
}

export function useAccountLink(secret: string) {
  return useQuery(getAccountLinkQueryOptions(secret));
}

export function useSetPasswordWithLink(secret: string) {
  return useMutation({
    mutationFn: (password: string) => apiRequest(`/api/account-links/${encodeURIComponent(secret)}`, { method: 'POST', body: { password }, auth: false }),
  });
}
