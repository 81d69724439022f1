/** Every in-app URL is built here so a renamed route is one edit. */
export const paths = {
  signIn: (next?: string, expired = false): string => {
    const params = new URLSearchParams();
    if (next && next !== '/') params.set('next', next);
    if (expired) params.set('expired', '1');
    const query = params.toString();
    return query ? `/sign-in?${query}` : '/sign-in';
  },
  projects: (): string => '/projects',
  /** The signed-in user's own settings: password, build mail per project. */
  account: (): string => '/account',
  project: (key: string): string => `/projects/${encodeURIComponent(key)}`,
  /** The builds table; `search` is the table state (page, sort, filters) without the `?`. */
  builds: (key: string, search?: string): string =>
    `/projects/${encodeURIComponent(key)}/builds${search ? `?${search}` : ''}`,
  build: (key: string, sha: string): string => `/projects/${encodeURIComponent(key)}/builds/${encodeURIComponent(sha)}`,
  capture: (key: string, sha: string, captureId: string): string =>
    `/projects/${encodeURIComponent(key)}/builds/${encodeURIComponent(sha)}/captures/${encodeURIComponent(captureId)}`,
  findings: (key: string, search?: string): string =>
    `/projects/${encodeURIComponent(key)}/findings${search ? `?${search}` : ''}`,
  tokens: (key: string): string => `/projects/${encodeURIComponent(key)}/tokens`,
  testCases: (key: string): string => `/projects/${encodeURIComponent(key)}/test-cases`,
  /** A test case's mask revisions; `search` selects a revision, the editor or a diff. */
  masks: (key: string, caseKey: string, search?: string): string =>
    `/projects/${encodeURIComponent(key)}/test-cases/${encodeURIComponent(caseKey)}/masks${search ? `?${search}` : ''}`,
  approvals: (key: string): string => `/projects/${encodeURIComponent(key)}/approvals`,
  audit: (key: string, search?: string): string => `/projects/${encodeURIComponent(key)}/audit${search ? `?${search}` : ''}`,
  members: (key: string): string => `/projects/${encodeURIComponent(key)}/members`,
  admin: (): string => '/admin',
  /** `user` (an e-mail) marks that person's row. */
  adminUsers: (user?: string): string => `/admin/users${user ? `?user=${encodeURIComponent(user)}` : ''}`,
  adminProjects: (): string => '/admin/projects',
  adminAudit: (search?: string): string => `/admin/audit${search ? `?${search}` : ''}`,
  /** The page a mailed invitation or password-reset link opens. */
  setPassword: (secret: string): string => `/set-password/${encodeURIComponent(secret)}`,
} as const;

/**
 * Only same-origin paths are honoured as a post-sign-in destination; anything else
 * (`//evil.example`, `https://…`) would turn the sign-in page into an open redirect.
 */
export function safeNextPath(value: string | null): string {
  if (!value || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) {
    return paths.projects();
  }
  if (value.startsWith('/sign-in')) return paths.projects();
  return value;
}
