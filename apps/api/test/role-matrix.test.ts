import { ApiToken, generateTokenSecret, type Project } from '@earmark/db';
import type { TokenScope } from '@earmark/contracts';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/**
 * The permission matrix written out by hand, independently of apps/api/src/auth/permissions.ts.
 * Every route of the app must have an entry: adding a route without one fails this test.
 */
type Caller =
  | 'anonymous' | 'viewer' | 'engineer' | 'qa_manager' | 'admin' | 'outsider'
  | 'token:full' | 'token:read' | 'token:submit' | 'token:foreign';

const PUBLIC = 'public' as const;
const SIGNED_IN: Caller[] = ['viewer', 'engineer', 'qa_manager', 'admin', 'outsider'];
const PROJECT_READERS: Caller[] = ['viewer', 'engineer', 'qa_manager', 'admin'];
const ADMIN: Caller[] = ['admin'];

const MATRIX: Record<string, Caller[] | typeof PUBLIC> = {
  'GET /api/health': PUBLIC,
  'POST /api/auth/login': PUBLIC,
  'POST /api/auth/refresh': PUBLIC,
  'POST /api/auth/logout': SIGNED_IN,
  'GET /api/me': SIGNED_IN,
  'GET /api/projects': SIGNED_IN,
  'POST /api/projects': ADMIN,
  'GET /api/projects/:project': PROJECT_READERS,
  'GET /api/projects/:project/members': PROJECT_READERS,
  'PUT /api/projects/:project/members': ADMIN,
  'DELETE /api/projects/:project/members/:userId': ADMIN,
  'GET /api/projects/:project/tokens': ADMIN,
  'POST /api/projects/:project/tokens': ADMIN,
  'DELETE /api/projects/:project/tokens/:tokenId': ADMIN,
  'GET /api/admin/users': ADMIN,
  'POST /api/admin/users': ADMIN,
  'GET /api/admin/audit': ADMIN,
  'POST /api/v1/projects/:project/builds': ['engineer', 'qa_manager', 'admin', 'token:full', 'token:submit'],
  'GET /api/v1/projects/:project/builds': [...PROJECT_READERS, 'token:full', 'token:read'],
  'GET /api/v1/projects/:project/builds/:sha': [...PROJECT_READERS, 'token:full', 'token:read'],
};

const CALLERS: Caller[] = ['anonymous', ...SIGNED_IN, 'token:full', 'token:read', 'token:submit', 'token:foreign'];

let api: TestApi;
const tokens: Partial<Record<Caller, string>> = {};

beforeAll(async () => {
  api = await startTestApi();
  const { project, otherProject, users } = api.fixture;
  const em = api.orm.em.fork();
  const create = async (p: Project, scopes: TokenScope[]) => {
    const secret = generateTokenSecret();
    em.create(ApiToken, { project: p.id, name: scopes.join('+'), prefix: secret.prefix, secretHash: secret.hash, scopes, createdBy: users.admin.id });
    await em.flush();
    return secret.token;
  };
  tokens['token:full'] = await create(project, ['submit-captures', 'read-verdicts']);
  tokens['token:read'] = await create(project, ['read-verdicts']);
  tokens['token:submit'] = await create(project, ['submit-captures']);
  tokens['token:foreign'] = await create(otherProject, ['submit-captures', 'read-verdicts']);
});
afterAll(() => api.close());

function concretePath(path: string): string {
  return path
    .replace(':project', api.fixture.project.key)
    .replace(':userId', '00000000-0000-4000-8000-000000000001')
    .replace(':tokenId', '00000000-0000-4000-8000-000000000002')
    .replace(':sha', 'deadbeefcafe');
}

/** Credentials for one request; users sign in afresh, since the logout route ends sessions. */
async function credentialFor(caller: Caller): Promise<string | undefined> {
  if (caller === 'anonymous') return undefined;
  if (caller.startsWith('token:')) return tokens[caller];
  return api.login(`${caller}@example.test`);
}

/** Every route the Express router really has, found by walking its stack. */
function mountedRoutes(): string[] {
  const found: string[] = [];
  type Layer = { route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
  const walk = (stack: Layer[]) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const [method, on] of Object.entries(layer.route.methods)) if (on && method !== '_all') found.push(`${method.toUpperCase()} ${layer.route.path}`);
      } else if (layer.handle?.stack) walk(layer.handle.stack);
    }
  };
  walk((api.app as unknown as { router: { stack: Layer[] } }).router.stack);
  return found;
}

describe('permission matrix', () => {
  it('has an entry for every route, and every entry is a route', () => {
    const keys = api.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`);
    const missing = keys.filter((k) => !(k in MATRIX));
    expect(missing, `routes without a matrix entry: ${missing.join(', ')}`).toEqual([]);
    expect(Object.keys(MATRIX).sort()).toEqual([...keys].sort());
  });

  it('mounts exactly the declared routes (nothing bypasses the matrix)', () => {
    const declared = api.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    const mounted = mountedRoutes().filter((k) => k.includes(' /api'));
    expect(mounted.sort()).toEqual(declared);
  });

  const cases = Object.entries(MATRIX).flatMap(([key, allowed]) => CALLERS.map((caller) => ({ key, allowed, caller })));
  it.each(cases)('$key as $caller', async ({ key, allowed, caller }) => {
    const [method, path] = key.split(' ') as [string, string];
    const token = await credentialFor(caller);
    const body = method === 'POST' || method === 'PUT' ? {} : undefined;
    const res = await api.request(method, concretePath(path), { token, body });
    const onlyProjectParam = !/:(userId|tokenId|sha)/.test(path);

    if (allowed === PUBLIC) {
      expect([401, 403]).not.toContain(res.status);
      return;
    }
    const isToken = caller.startsWith('token:');
    const isCiRoute = path.startsWith('/api/v1/');
    if (allowed.includes(caller)) {
      expect([401, 403], res.text).not.toContain(res.status);
      if (onlyProjectParam) expect(res.status, res.text).not.toBe(404);
    } else if (caller === 'anonymous') {
      expect(res.status).toBe(401);
    } else if (caller === 'outsider' && path.includes(':project')) {
      // Non-members do not learn that the project exists.
      expect(res.status).toBe(404);
    } else {
      expect(res.status, `${key} as ${caller}: ${res.text}`).toBe(403);
      if (isToken && !isCiRoute) expect(res.body.detail).toContain('/api/v1');
    }
    if (res.status >= 400) expect(res.contentType).toMatch(/problem\+json/);
  });
});
