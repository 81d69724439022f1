/** Query keys and API paths of the masks feature; mutations invalidate through these roots. */
export function masksKeyRoot(projectKey: string, caseKey: string) {
  return ['projects', projectKey, 'test-cases', caseKey, 'masks'] as const;
}

export function casePath(projectKey: string, caseKey: string): string {
  return `/api/projects/${encodeURIComponent(projectKey)}/test-cases/${encodeURIComponent(caseKey)}`;
}

export function revisionPath(projectKey: string, caseKey: string, revision: number): string {
  return `${casePath(projectKey, caseKey)}/masks/${revision}`;
}
