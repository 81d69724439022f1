import { TestCaseDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { casePath } from './keys';

export function getTestCase(projectKey: string, caseKey: string, signal?: AbortSignal): Promise<TestCaseDto> {
  return apiRequest(casePath(projectKey, caseKey), { schema: TestCaseDto, signal });
}

/** Under the project's test-case key, so saving a test case elsewhere refreshes it here too. */
export function getTestCaseQueryOptions(projectKey: string, caseKey: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'test-cases', 'one', caseKey] as const,
    queryFn: ({ signal }) => getTestCase(projectKey, caseKey, signal),
    staleTime: 60_000,
  });
}

export function useTestCase(projectKey: string, caseKey: string) {
  return useQuery(getTestCaseQueryOptions(projectKey, caseKey));
}
