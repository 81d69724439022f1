import type { CurrentUser, Problem, Project, ProjectOverview } from '@earmark/contracts';
import { vi } from 'vitest';

export type RecordedRequest = { method: string; path: string; authorization: string | null; body: unknown; /** The query string (`?state=approved`), '' without one; handlers are keyed by path only. */ search: string };
type Handler = (request: RecordedRequest) => Response | Promise<Response>;

export function json(body: unknown, status = 200): Response {
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });
}

export function problem(status: number, title: string, detail?: string): Response {
  const body: Problem = { type: 'about:blank', title, status, ...(detail ? { detail } : {}) };
  return new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/problem+json' } });
}

/**
 * Replaces fetch with a table of `METHOD /path` handlers and records every request, so a
 * test can assert what the app sent (and in which order) as well as what it showed.
 */
export function mockApi(handlers: Record<string, Handler>) {
  const requests: RecordedRequest[] = [];
  const fetchMock = vi.fn(async (input: RequestInfo | URL, init?: RequestInit): Promise<Response> => {
    const url = new URL(typeof input === 'string' ? input : input instanceof URL ? input.href : input.url, 'http://localhost');
    const headers = new Headers(init?.headers);
    const request: RecordedRequest = {
      method: init?.method ?? 'GET',
      path: url.pathname,
      search: url.search,
      authorization: headers.get('Authorization'),
      body: typeof init?.body === 'string' ? (JSON.parse(init.body) as unknown) : undefined,
    };
    requests.push(request);
    const handler = handlers[`${request.method} ${request.path}`];
    if (!handler) return problem(404, 'Not Found', `No mock for ${request.method} ${request.path}`);
    return handler(request);
  });
  vi.stubGlobal('fetch', fetchMock);
  return { requests, fetchMock };
}

export const qaUser: CurrentUser = {
  id: 'u-qa',
  email: 'qa@fernwick.test',
  displayName: 'Quinn Abara',
  isAdmin: false,
  memberships: [
    { projectKey: 'kestrel-buds', projectName: 'Kestrel Buds', role: 'qa_manager' },
    { projectKey: 'heron-bar', projectName: 'Heron Soundbar', role: 'viewer' },
  ],
};

export const kestrel: Project = {
  key: 'kestrel-buds',
  name: 'Kestrel Buds',
  description: 'True-wireless earbuds, ANC and transparency modes.',
  createdAt: '2025-03-04T09:00:00.000Z',
  myRole: 'qa_manager',
  targetCount: 3,
  testCaseCount: 14,
  buildCount: 212,
  storageUsedBytes: 1_610_612_736,
  storageQuotaBytes: null,
  storageQuotaSource: 'default',
  archivedAt: null,
};

export const heron: Project = {
  key: 'heron-bar',
  name: 'Heron Soundbar',
  description: 'Five-driver soundbar with a DSP crossover.',
  createdAt: '2025-05-20T12:30:00.000Z',
  myRole: 'viewer',
  targetCount: 2,
  testCaseCount: 9,
  buildCount: 0,
  storageUsedBytes: 0,
  storageQuotaBytes: null,
  storageQuotaSource: 'default',
  archivedAt: null,
};

export function seedSession(accessToken = 'access-1', refreshToken = 'refresh-1'): void {
  window.localStorage.setItem('earmark.session', JSON.stringify({ accessToken, refreshToken }));
}

/** A project overview with nothing to report, for pages that render the overview or the menu's counts. */
export const quietOverview: ProjectOverview = {
  mainBranch: 'main',
  main: null,
  branches: [],
  failing: [],
  drifting: [],
  awaiting: [],
  counts: { awaitingYou: 0, openFindingsOnMain: 0 },
};
