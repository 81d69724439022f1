import { TestCaseDto } from '@earmark/contracts';
import { queryOptions, useQuery } from '@tanstack/react-query';
import { z } from 'zod';
import { apiRequest } from '@/lib/api-client';

const TestCaseList = z.object({ items: z.array(TestCaseDto) });

/** Every test-case query of a project sits under this key; saving one invalidates them all. */
export function testCasesKeyRoot(projectKey: string) {
  return ['projects', projectKey, 'test-cases'] as const;
}

export function testCasesPath(projectKey: string): string {
  return `/api/projects/${encodeURIComponent(projectKey)}/test-cases`;
}

export async function getTestCases(projectKey: string, signal?: AbortSignal): Promise<TestCaseDto[]> {
  const { items } = await apiRequest(testCasesPath(projectKey), { schema: TestCaseList, signal });
  return items;
}

export function getTestCasesQueryOptions(projectKey: string) {
  return queryOptions({
    queryKey: [...testCasesKeyRoot(projectKey), 'list'] as const,
    queryFn: ({ signal }) => getTestCases(projectKey, signal),
  });
}

export function useTestCases(projectKey: string) {
  return useQuery(getTestCasesQueryOptions(projectKey));
}
