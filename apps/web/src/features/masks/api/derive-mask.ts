import { DeriveMaskResponse, type DeriveMaskRequestInput } from '@earmark/contracts';
import { useMutation } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { casePath } from './keys';

/** Proposes magnitude-envelope limits from golden captures; nothing is stored until "Use as draft". */
export function deriveMask(projectKey: string, caseKey: string, body: DeriveMaskRequestInput): Promise<DeriveMaskResponse> {
  return apiRequest(`${casePath(projectKey, caseKey)}/masks/derive`, { method: 'POST', body, schema: DeriveMaskResponse });
}

export function useDeriveMask(projectKey: string, caseKey: string) {
  return useMutation({ mutationFn: (body: DeriveMaskRequestInput) => deriveMask(projectKey, caseKey, body) });
}
