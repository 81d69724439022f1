/** URLs that API answers, JUnit XML and e-mails point to: one set for every process. */
export function createLinks(publicUrl: string) {
  const base = publicUrl.replace(/\/$/, '');
  return {
    captureApi: (id: string) => `${base}/api/v1/captures/${id}`,
    buildApi: (project: string, sha: string) => `${base}/api/v1/projects/${project}/builds/${sha}`,
    junit: (project: string, sha: string) => `${base}/api/v1/projects/${project}/builds/${sha}/junit.xml`,
    buildPage: (project: string, sha: string) => `${base}/projects/${project}/builds/${sha}`,
    capturePage: (project: string, sha: string, id: string) => `${base}/projects/${project}/builds/${sha}/captures/${id}`,
    masksPage: (project: string, testCase: string) => `${base}/projects/${project}/test-cases/${encodeURIComponent(testCase)}/masks`,
    approvalsPage: (project: string) => `${base}/projects/${project}/approvals`,
    findingsPage: (project: string) => `${base}/projects/${project}/findings`,
    /** The project page's mail section, where a member switches build mail on or off. */
    settingsPage: (project: string) => `${base}/projects/${project}#mail`,
    /** The one-time page of an invitation or password reset: the secret is the last path segment. */
    accountLinkPage: (secret: string) => `${base}/set-password/${secret}`,
  };
}
export type Links = ReturnType<typeof createLinks>;
