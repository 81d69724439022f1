import { TestCaseDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

/** Only what the filter needs; the full test case (stimulus, analysis) belongs to its own page. */
const TestCaseOption = TestCaseDto.pick({ key: true, name: true });
export type TestCaseOption = z.infer<typeof TestCaseOption>;
const TestCaseList = z.object({ items: z.array(TestCaseOption) });

export async function getTestCaseOptions(projectKey: string, signal?: AbortSignal): Promise<TestCaseOption[]> {
  const { items } = await apiRequest(`/api/projects/${encodeURIComponent(projectKey)}/test-cases`, { schema: TestCaseList, signal });
  return items;
}

export function getTestCaseOptionsQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: ['projects', projectKey, 'test-cases', 'options'] as const,
    queryFn: ({ signal }) => getTestCaseOptions(projectKey, signal),
    staleTime: 5 * 60_000,
  });
}

export function useTestCaseOptions(projectKey: string) {
  return useQuery(getTestCaseOptionsQueryOptions(projectKey));
}
