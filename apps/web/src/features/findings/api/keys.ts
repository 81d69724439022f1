/** Query-key roots of the findings feature; mutations invalidate through these. */
export function findingsKeyRoot(projectKey: string) {
  return ['projects', projectKey, 'findings'] as const;
}

export function commentsKey(projectKey: string, findingId: string) {
  return [...findingsKeyRoot(projectKey), 'comments', findingId] as const;
}
