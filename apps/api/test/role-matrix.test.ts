import { ApiToken, Build, Capture, Target, TestCase, type Project } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { encodeWav } from '@earmark/dsp';
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
const CONFIGURERS: Caller[] = ['engineer', 'qa_manager', 'admin'];
const CI_READERS: Caller[] = [...PROJECT_READERS, 'token:full', 'token:read'];
const CI_SUBMITTERS: Caller[] = [...CONFIGURERS, 'token:full', 'token:submit'];

const MATRIX: Record<string, Caller[] | typeof PUBLIC> = {
  'GET /api/health': PUBLIC,
  'GET /api/health/live': PUBLIC,
  'GET /api/health/ready': PUBLIC,
  'GET /api/v1/openapi.json': PUBLIC,
  'GET /api/docs': PUBLIC,
  'POST /api/auth/login': PUBLIC,
  'POST /api/auth/refresh': PUBLIC,
  'POST /api/auth/logout': SIGNED_IN,
  'GET /api/me': SIGNED_IN,
  // one's own password; CI tokens act for a project, not a person
  'PUT /api/me/password': SIGNED_IN,
  'GET /api/projects': SIGNED_IN,
  'POST /api/projects': ADMIN,
  'GET /api/projects/:project': PROJECT_READERS,
  'PATCH /api/projects/:project': ADMIN,
  'GET /api/projects/:project/members': PROJECT_READERS,
  'PUT /api/projects/:project/members': ADMIN,
  'DELETE /api/projects/:project/members/:userId': ADMIN,
  // one's own build-mail setting: every member, viewers included
  'GET /api/projects/:project/subscription': PROJECT_READERS,
  'PUT /api/projects/:project/subscription': PROJECT_READERS,
  'GET /api/projects/:project/tokens': ADMIN,
  'POST /api/projects/:project/tokens': ADMIN,
  'DELETE /api/projects/:project/tokens/:tokenId': ADMIN,
  'GET /api/admin/users': ADMIN,
  'POST /api/admin/users': ADMIN,
  'GET /api/admin/audit': ADMIN,
  'POST /api/admin/users/invitations': ADMIN,
  'PATCH /api/admin/users/:userId': ADMIN,
  'POST /api/admin/users/:userId/password-reset': ADMIN,
  // the page a mailed invitation or reset link opens: the link's secret is the credential
  'GET /api/account-links/:secret': PUBLIC,
  'POST /api/account-links/:secret': PUBLIC,
  'GET /api/projects/:project/targets': PROJECT_READERS,
  'POST /api/projects/:project/targets': CONFIGURERS,
  'PATCH /api/projects/:project/targets/:targetKey': CONFIGURERS,
  'GET /api/projects/:project/test-cases': PROJECT_READERS,
  'POST /api/projects/:project/test-cases': CONFIGURERS,
  'GET /api/projects/:project/test-cases/:caseKey': PROJECT_READERS,
  'PATCH /api/projects/:project/test-cases/:caseKey': CONFIGURERS,
  'GET /api/projects/:project/test-cases/:caseKey/stimulus.wav': PROJECT_READERS,
  'GET /api/v1/projects/:project/test-cases/:caseKey/stimulus.wav': CI_READERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks': PROJECT_READERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks': CONFIGURERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/approve': ['qa_manager', 'admin'],
  'GET /api/projects/:project/builds': PROJECT_READERS,
  'GET /api/projects/:project/builds/trend': PROJECT_READERS,
  'GET /api/projects/:project/overview': PROJECT_READERS,
  'GET /api/projects/:project/builds/:sha/matrix': PROJECT_READERS,
  'GET /api/projects/:project/captures/:id': PROJECT_READERS,
  'GET /api/projects/:project/captures/:id/plot': PROJECT_READERS,
  'GET /api/projects/:project/captures/:id/audio/:kind': PROJECT_READERS,
  'GET /api/projects/:project/captures/:id/download': PROJECT_READERS,
  // analysing again queues work and writes a verdict: engineers and up, like submitting
  'POST /api/projects/:project/captures/:id/reanalyse': CONFIGURERS,
  'GET /api/projects/:project/findings': PROJECT_READERS,
  'PATCH /api/projects/:project/findings/:id': CONFIGURERS,
  'POST /api/projects/:project/findings/bulk': CONFIGURERS,
  'GET /api/projects/:project/findings/:id/comments': PROJECT_READERS,
  'POST /api/projects/:project/findings/:id/comments': CONFIGURERS,
  'POST /api/v1/projects/:project/builds': CI_SUBMITTERS,
  'GET /api/v1/projects/:project/builds': CI_READERS,
  'GET /api/v1/projects/:project/builds/:sha': CI_READERS,
  'GET /api/v1/projects/:project/builds/:sha/junit.xml': CI_READERS,
  'POST /api/v1/projects/:project/builds/:sha/captures': CI_SUBMITTERS,
  'GET /api/v1/captures/:id': CI_READERS,
  // mask workflow
  'GET /api/projects/:project/masks': PROJECT_READERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks/:revision': PROJECT_READERS,
  'PATCH /api/projects/:project/test-cases/:caseKey/masks/:revision': CONFIGURERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/submit': CONFIGURERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/reject': ['qa_manager', 'admin'],
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/copy': CONFIGURERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks/:revision/diff': PROJECT_READERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks/:revision/history': PROJECT_READERS,
  'GET /api/projects/:project/audit': ['qa_manager', 'admin'],
  'POST /api/projects/:project/findings/:id/waivers': CONFIGURERS,
  'GET /api/projects/:project/waivers': PROJECT_READERS,
  'POST /api/projects/:project/waivers/:id/approve': ['qa_manager', 'admin'],
  'POST /api/projects/:project/waivers/:id/reject': ['qa_manager', 'admin'],
  'POST /api/projects/:project/waivers/:id/revoke': ['qa_manager', 'admin'],
  // derivation, impact, drift
  'POST /api/projects/:project/test-cases/:caseKey/masks/derive': CONFIGURERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/impact': CONFIGURERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks/:revision/impact': PROJECT_READERS,
  'GET /api/projects/:project/test-cases/:caseKey/masks/:revision/impact/:runId': PROJECT_READERS,
  'POST /api/projects/:project/test-cases/:caseKey/masks/:revision/reevaluate': ['qa_manager', 'admin'],
  'GET /api/projects/:project/drift': PROJECT_READERS,
};

const CALLERS: Caller[] = ['anonymous', ...SIGNED_IN, 'token:full', 'token:read', 'token:submit', 'token:foreign'];

let api: TestApi;
const tokens: Partial<Record<Caller, string>> = {};
let captureId = '';

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
  // A real capture, so that the route resolving its project from the capture id can answer.
  const testCase = em.create(TestCase, { project: project.id, key: 'matrix.case', name: 'matrix', stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 } });
  const target = em.create(Target, { project: project.id, key: 'matrix-target', name: 'matrix' });
  const build = em.create(Build, { project: project.id, sha: 'c0ffee1' });
  const wav = encodeWav([new Float64Array(4800)], 48000, { encoding: 'float', bitsPerSample: 32 });
  await api.objectStore.put('matrix/capture.wav', wav, 'audio/wav');
  const capture = em.create(Capture, { project: project.id, build, testCase, target, objectKey: 'matrix/capture.wav', sha256: '0'.repeat(64), sizeBytes: wav.length, format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 4800 });
  await em.flush();
  captureId = capture.id;
});
afterAll(() => api.close());

function concretePath(path: string): string {
  return path
    .replace(':project', api.fixture.project.key)
    .replace(':userId', '00000000-0000-4000-8000-000000000001')
    .replace(':tokenId', '00000000-0000-4000-8000-000000000002')
    .replace(':sha', 'deadbeefcafe')
    .replace(':targetKey', 'no-such-target')
    .replace(':caseKey', 'no.such.case')
    .replace(':revision', '1')
    .replace(':kind', 'capture')
    .replace(':id', captureId);
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
    const onlyProjectParam = !/:(userId|tokenId|sha|targetKey|caseKey)|(findings|waivers)\/:id/.test(path);

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
    } else if (caller === 'outsider' && (path.includes(':project') || path.includes(':id'))) {
      // Non-members do not learn that the project exists.
      expect(res.status).toBe(404);
    } else if (caller === 'token:foreign' && isCiRoute) {
      // Another project's CI token learns no more than a non-member: the same 404.
      expect(res.status, res.text).toBe(404);
    } else {
      expect(res.status, `${key} as ${caller}: ${res.text}`).toBe(403);
      if (isToken && !isCiRoute) expect(res.body.detail).toContain('/api/v1');
    }
    if (res.status >= 400) expect(res.contentType).toMatch(/problem\+json/);
  });
});
