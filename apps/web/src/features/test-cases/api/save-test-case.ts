import { TestCaseDto, type CreateTestCaseRequest, type UpdateTestCaseRequest } from '@earmark/contracts';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { apiRequest } from '@/lib/api-client';
import { testCasesKeyRoot, testCasesPath } from './get-test-cases';

export function createTestCase(projectKey: string, body: CreateTestCaseRequest): Promise<TestCaseDto> {
  return apiRequest(testCasesPath(projectKey), { method: 'POST', body, schema: TestCaseDto });
}

export function updateTestCase(projectKey: string, caseKey: string, body: UpdateTestCaseRequest): Promise<TestCaseDto> {
  return apiRequest(`${testCasesPath(projectKey)}/${encodeURIComponent(caseKey)}`, { method: 'PATCH', body, schema: TestCaseDto });
}

export type SaveTestCase = { mode: 'create'; body: CreateTestCaseRequest } | { mode: 'update'; caseKey: string; body: UpdateTestCaseRequest };

/** Creates or changes a test case; every test-case list of the project (filters too) refreshes. */
export function useSaveTestCase(projectKey: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SaveTestCase) =>
      input.mode === 'create' ? createTestCase(projectKey, input.body) : updateTestCase(projectKey, input.caseKey, input.body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: testCasesKeyRoot(projectKey) }),
  });
}
