/** Query-key root and paths of the approvals feature. */
export function approvalsKeyRoot(projectKey: string) {
  return ['projects', projectKey, 'approvals'] as const;
}

export function projectPath(projectKey: string): string {
  return `/api/projects/${encodeURIComponent(projectKey)}`;
}

export function revisionPath(projectKey: string, caseKey: string, revision: number): string {
  return `${projectPath(projectKey)}/test-cases/${encodeURIComponent(caseKey)}/masks/${revision}`;
}
