import { AccountLink, AuditEvent, Notification, TEST_PASSWORD, User } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
let admin = '';
beforeAll(async () => {
  api = await startTestApi();
  admin = await api.login('admin@example.test');
});
afterAll(() => api.close());

const NEW_PASSWORD = 'a-new-passphrase-42';

/** The secret of the newest mailed link to `email`, read from the outbox as the worker would send it. */
async function mailedSecret(email: string, kind: string): Promise<string> {
  const mail = await api.orm.em.fork().findOneOrFail(Notification, { recipient: email, kind }, { orderBy: { createdAt: 'desc' } });
  const match = /\/set-password\/([A-Za-z0-9_-]{43})/.exec(mail.body);
  expect(match, mail.body).not.toBeNull();
  return match![1]!;
}

const signIn = (email: string, password: string) => api.request('POST', '/api/auth/login', { body: { email, password } });
const userId = async (email: string) => (await api.orm.em.fork().findOneOrFail(User, { email })).id;

describe('inviting a person', () => {
  it('creates an invited user who signs in only after choosing a password through the one-time link', async () => {
    const res = await api.request('POST', '/api/admin/users/invitations', { token: admin, body: { email: 'Nadia@Example.test', displayName: 'Nadia Invitee' } });
    expect(res.status, res.text).toBe(201);
    expect(res.body.user).toMatchObject({ email: 'nadia@example.test', displayName: 'Nadia Invitee', status: 'invited', isAdmin: false, disabled: false });
    const hours = (Date.parse(res.body.expiresAt) - Date.now()) / 3_600_000;
    expect(hours).toBeGreaterThan(71.9);
    expect(hours).toBeLessThanOrEqual(72);

    const secret = await mailedSecret('nadia@example.test', 'account-invite');
    const mail = await api.orm.em.fork().findOneOrFail(Notification, { recipient: 'nadia@example.test', kind: 'account-invite' });
    expect(mail.subject).toBe('[Earmark] You are invited to Earmark');
    expect(mail.body).toContain('admin (admin@example.test) invited you, Nadia Invitee');
    // Only the hash is stored.
    const links = await api.orm.em.fork().find(AccountLink, { user: { email: 'nadia@example.test' } });
    expect(links).toHaveLength(1);
    expect(links[0]!.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(links[0]!.tokenHash).not.toContain(secret);

    expect((await signIn('nadia@example.test', NEW_PASSWORD)).status).toBe(401);
    const info = await api.request('GET', `/api/account-links/${secret}`);
    expect(info.status).toBe(200);
    expect(info.body).toMatchObject({ purpose: 'invite', email: 'nadia@example.test', displayName: 'Nadia Invitee' });

    const short = await api.request('POST', `/api/account-links/${secret}`, { body: { password: 'short' } });
    expect(short.status).toBe(422);
    expect(short.body.errors[0]).toMatchObject({ path: 'body.password', message: 'at least 10 characters' });

    expect((await api.request('POST', `/api/account-links/${secret}`, { body: { password: NEW_PASSWORD } })).status).toBe(204);
    const session = await signIn('nadia@example.test', NEW_PASSWORD);
    expect(session.status).toBe(200);
    expect(session.body.user.email).toBe('nadia@example.test');
    const listed = await api.request('GET', '/api/admin/users', { token: admin });
    expect(listed.body.items.find((u: { email: string }) => u.email === 'nadia@example.test').status).toBe('active');

    const again = await api.request('POST', `/api/account-links/${secret}`, { body: { password: 'another-passphrase-1' } });
    expect(again.status).toBe(410);
    expect(again.body.detail).toContain('already used');
    expect(again.contentType).toMatch(/problem\+json/);
    expect((await signIn('nadia@example.test', 'another-passphrase-1')).status).toBe(401);

    const actions = (await api.orm.em.fork().find(AuditEvent, { subject: 'user:nadia@example.test', action: { $like: 'user.%' } }, { orderBy: { createdAt: 'asc' } })).map((e) => `${e.actor} ${e.action}`);
    expect(actions).toEqual(['user:admin@example.test user.invite', 'user:nadia@example.test user.accept-invite']);
  });

  it('refuses an expired link and an unknown one with 410 and words, and a malformed one with 422', async () => {
    await api.request('POST', '/api/admin/users/invitations', { token: admin, body: { email: 'late@example.test', displayName: 'Late Comer' } });
    const secret = await mailedSecret('late@example.test', 'account-invite');
    await api.orm.em.fork().nativeUpdate(AccountLink, { user: { email: 'late@example.test' } }, { expiresAt: new Date('2026-01-02T03:04:00Z') });
    const expired = await api.request('POST', `/api/account-links/${secret}`, { body: { password: NEW_PASSWORD } });
    expect(expired.status).toBe(410);
    expect(expired.body.detail).toBe('This link expired on 2026-01-02 03:04 UTC (links work for 72 hours). Ask an administrator to send a new one.');
    expect(expired.body.code).toBe('account-link-expired');
    const unknown = await api.request('GET', `/api/account-links/${'A'.repeat(43)}`);
    expect(unknown.status).toBe(410);
    expect(unknown.body.detail).toContain('not valid');
    expect((await api.request('GET', '/api/account-links/not-a-link')).status).toBe(422);
  });

  it('refuses an e-mail that already has an account with 409', async () => {
    const res = await api.request('POST', '/api/admin/users/invitations', { token: admin, body: { email: 'viewer@example.test', displayName: 'Twice' } });
    expect(res.status).toBe(409);
    expect(res.body.detail).toBe('A user with e-mail viewer@example.test already exists.');
  });
});

describe('disabling and resetting', () => {
  it('ends the sessions of a disabled user and stops sign-in and refresh; enabling lets them back', async () => {
    const session = (await signIn('engineer@example.test', TEST_PASSWORD)).body;
    const id = await userId('engineer@example.test');
    const res = await api.request('PATCH', `/api/admin/users/${id}`, { token: admin, body: { disabled: true } });
    expect(res.status, res.text).toBe(200);
    expect(res.body).toMatchObject({ status: 'disabled', disabled: true });
    expect((await api.request('GET', '/api/me', { token: session.accessToken })).status).toBe(401);
    expect((await api.request('POST', '/api/auth/refresh', { body: { refreshToken: session.refreshToken } })).status).toBe(401);
    expect((await signIn('engineer@example.test', TEST_PASSWORD)).status).toBe(401);
    const audit = await api.orm.em.fork().findOneOrFail(AuditEvent, { action: 'user.disable', subject: 'user:engineer@example.test' });
    expect(audit.details).toMatchObject({ before: { disabled: false }, after: { disabled: true } });

    expect((await api.request('PATCH', `/api/admin/users/${id}`, { token: admin, body: { disabled: false } })).body.status).toBe('active');
    expect((await signIn('engineer@example.test', TEST_PASSWORD)).status).toBe(200);
  });

  it('does not let an administrator disable or demote themselves', async () => {
    const id = await userId('admin@example.test');
    const res = await api.request('PATCH', `/api/admin/users/${id}`, { token: admin, body: { disabled: true } });
    expect(res.status).toBe(403);
    expect(res.body.detail).toContain('cannot disable yourself');
    expect((await api.request('PATCH', `/api/admin/users/${id}`, { token: admin, body: { isAdmin: false } })).status).toBe(403);
    expect((await api.request('PATCH', `/api/admin/users/${id}`, { token: admin, body: {} })).status).toBe(422);
    expect((await api.request('PATCH', '/api/admin/users/00000000-0000-4000-8000-000000000009', { token: admin, body: { disabled: true } })).status).toBe(404);
  });

  it('mails a reset link; the old password works until it is used, a second reset voids the first link', async () => {
    const id = await userId('viewer@example.test');
    const first = await api.request('POST', `/api/admin/users/${id}/password-reset`, { token: admin });
    expect(first.status).toBe(202);
    const firstSecret = await mailedSecret('viewer@example.test', 'password-reset');
    expect((await signIn('viewer@example.test', TEST_PASSWORD)).status).toBe(200);
    await api.request('POST', `/api/admin/users/${id}/password-reset`, { token: admin });
    const secondSecret = await mailedSecret('viewer@example.test', 'password-reset');
    expect(secondSecret).not.toBe(firstSecret);
    expect((await api.request('GET', `/api/account-links/${firstSecret}`)).status).toBe(410);
    expect((await api.request('GET', `/api/account-links/${secondSecret}`)).body.purpose).toBe('reset');
    expect((await api.request('POST', `/api/account-links/${secondSecret}`, { body: { password: NEW_PASSWORD } })).status).toBe(204);
    expect((await signIn('viewer@example.test', TEST_PASSWORD)).status).toBe(401);
    expect((await signIn('viewer@example.test', NEW_PASSWORD)).status).toBe(200);
    // Put the fixture back for the other tests.
    await api.orm.em.fork().nativeUpdate(User, { id }, { passwordHash: (await api.orm.em.fork().findOneOrFail(User, { email: 'qa_manager@example.test' })).passwordHash });
  });

  it.each(['viewer', 'engineer', 'qa_manager'])('refuses the admin routes to a %s with 403 and to nobody signed in with 401', async (role) => {
    const token = await api.login(`${role}@example.test`);
    const id = await userId('viewer@example.test');
    const calls: [string, string, unknown][] = [
      ['POST', '/api/admin/users/invitations', { email: 'x@example.test', displayName: 'X' }],
      ['PATCH', `/api/admin/users/${id}`, { disabled: true }],
      ['POST', `/api/admin/users/${id}/password-reset`, undefined],
      ['GET', '/api/admin/audit', undefined],
    ];
    for (const [method, path, body] of calls) {
      const res = await api.request(method, path, { token, body });
      expect(res.status, `${method} ${path}`).toBe(403);
      expect(res.body.detail).toBe('Only administrators may do this.');
      expect((await api.request(method, path, { body })).status).toBe(401);
    }
  });
});

describe('projects: archive and members', () => {
  it('archives a project: it leaves the lists, refuses uploads with 409, and stays readable to admins only', async () => {
    expect((await api.request('POST', '/api/projects', { token: admin, body: { key: 'delta-amp', name: 'Delta Amp' } })).status).toBe(201);
    expect((await api.request('PUT', '/api/projects/delta-amp/members', { token: admin, body: { email: 'engineer@example.test', role: 'engineer' } })).status).toBe(200);
    const engineer = await api.login('engineer@example.test');
    expect((await api.request('POST', '/api/v1/projects/delta-amp/builds', { token: engineer, body: { sha: 'abc1234' } })).status).toBe(201);

    const archived = await api.request('PATCH', '/api/projects/delta-amp', { token: admin, body: { archived: true } });
    expect(archived.status).toBe(200);
    expect(Date.parse(archived.body.archivedAt)).toBeGreaterThan(Date.now() - 60_000);

    const ciToken = (await api.request('POST', '/api/projects/delta-amp/tokens', { token: admin, body: { name: 'delta-ci' } })).body.secret;
    const upload = await api.request('POST', '/api/v1/projects/delta-amp/builds', { token: ciToken, body: { sha: 'abc1235' } });
    expect(upload.status).toBe(409);
    expect(upload.body.detail).toMatch(/^Project delta-amp was archived on \d{4}-\d{2}-\d{2} and accepts no builds or captures/);
    expect(upload.body.code).toBe('project-archived');
    // Members who are not administrators no longer see it at all.
    expect((await api.request('GET', '/api/projects/delta-amp', { token: engineer })).status).toBe(404);
    expect((await api.request('POST', '/api/v1/projects/delta-amp/builds', { token: engineer, body: { sha: 'abc1235' } })).status).toBe(404);
    expect((await api.request('GET', '/api/projects', { token: engineer })).body.items.map((p: { key: string }) => p.key)).toEqual(['alpha-dsp']);
    expect((await api.request('GET', '/api/projects', { token: admin })).body.items.map((p: { key: string }) => p.key)).not.toContain('delta-amp');
    const all = await api.request('GET', '/api/projects?archived=include', { token: admin });
    expect(all.body.items.find((p: { key: string }) => p.key === 'delta-amp')).toMatchObject({ name: 'Delta Amp', buildCount: 1 });
    expect((await api.request('GET', '/api/projects/delta-amp', { token: admin })).body.archivedAt).not.toBeNull();
    expect((await api.request('GET', '/api/projects?archived=maybe', { token: admin })).status).toBe(422);

    const restored = await api.request('PATCH', '/api/projects/delta-amp', { token: admin, body: { archived: false } });
    expect(restored.body.archivedAt).toBeNull();
    expect((await api.request('POST', '/api/v1/projects/delta-amp/builds', { token: engineer, body: { sha: 'abc1235' } })).status).toBe(201);
    const actions = (await api.orm.em.fork().find(AuditEvent, { subject: 'project:delta-amp' }, { orderBy: { createdAt: 'asc' } })).map((e) => e.action);
    expect(actions).toEqual(['project.create', 'project.archive', 'project.restore']);
  });

  it('keeps the last QA manager of a project: no demotion or removal until there is another', async () => {
    const qaId = await userId('qa_manager@example.test');
    const demote = await api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'qa_manager@example.test', role: 'engineer' } });
    expect(demote.status).toBe(409);
    expect(demote.body.detail).toBe('qa_manager@example.test is the last QA manager of alpha-dsp; make another member QA manager first, so masks and waivers can still be decided.');
    expect((await api.request('DELETE', `/api/projects/alpha-dsp/members/${qaId}`, { token: admin })).status).toBe(409);

    expect((await api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'nadia@example.test', role: 'qa_manager' } })).status).toBe(200);
    expect((await api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'qa_manager@example.test', role: 'engineer' } })).status).toBe(200);
    expect((await api.request('DELETE', `/api/projects/alpha-dsp/members/${qaId}`, { token: admin })).status).toBe(204);
    const members = await api.request('GET', '/api/projects/alpha-dsp/members', { token: admin });
    expect(members.body.items.map((m: { email: string; role: string }) => `${m.email} ${m.role}`)).toContain('nadia@example.test qa_manager');
    expect(members.body.items.map((m: { email: string }) => m.email)).not.toContain('qa_manager@example.test');
    // Back as it was.
    await api.request('PUT', '/api/projects/alpha-dsp/members', { token: admin, body: { email: 'qa_manager@example.test', role: 'qa_manager' } });
  });
});

describe('workspace audit log', () => {
  it('names actors and subjects, links their pages, and filters by actor, action, project and dates', async () => {
    const byAction = await api.request('GET', '/api/admin/audit?action=user.invite', { token: admin });
    expect(byAction.status).toBe(200);
    const invite = byAction.body.items.find((r: { subject: string }) => r.subject === 'user:nadia@example.test');
    expect(invite.actorRef).toEqual({ ref: 'user:admin@example.test', kind: 'user', label: 'admin', href: '/admin/users?user=admin%40example.test' });
    expect(invite.subjectRef).toEqual({ ref: 'user:nadia@example.test', kind: 'user', label: 'Nadia Invitee', href: '/admin/users?user=nadia%40example.test' });
    expect(byAction.body.items.every((r: { action: string }) => r.action === 'user.invite')).toBe(true);

    const project = await api.request('GET', '/api/admin/audit?project=delta-amp&pageSize=100', { token: admin });
    const refs = project.body.items.map((r: { action: string; subjectRef: { label: string; href: string | null } }) => `${r.action} → ${r.subjectRef.label} ${r.subjectRef.href}`);
    expect(refs).toContain('project.archive → Delta Amp /projects/delta-amp');
    expect(refs).toContain('build.create → build abc1234 /projects/delta-amp/builds/abc1234');
    expect(project.body.items.every((r: { projectName: string }) => r.projectName === 'Delta Amp')).toBe(true);

    const byActor = await api.request('GET', '/api/admin/audit?actor=engineer@example.test&action=build.', { token: admin });
    expect(byActor.body.total).toBe(2);
    expect(byActor.body.items[0].actorRef.label).toBe('engineer');

    const today = new Date().toISOString().slice(0, 10);
    expect((await api.request('GET', `/api/admin/audit?from=${today}&to=${today}&action=project.archive`, { token: admin })).body.total).toBe(1);
    expect((await api.request('GET', '/api/admin/audit?to=2026-01-01&action=project.archive', { token: admin })).body.total).toBe(0);
    const backwards = await api.request('GET', '/api/admin/audit?from=2026-02-01&to=2026-01-01', { token: admin });
    expect(backwards.status).toBe(422);
    expect(backwards.body.errors[0]).toMatchObject({ path: 'query.to', message: 'must not be before from' });
  });
});

// After the workspace audit log test, which counts today's project.archive events.
describe('archived projects in the signed-in user', () => {
  it('leaves roles in archived projects out of /api/me and the sign-in answer, for members and administrators alike', async () => {
    expect((await api.request('POST', '/api/projects', { token: admin, body: { key: 'echo-amp', name: 'Echo Amp' } })).status).toBe(201);
    for (const [email, role] of [['viewer@example.test', 'qa_manager'], ['admin@example.test', 'viewer']] as const) {
      expect((await api.request('PUT', '/api/projects/echo-amp/members', { token: admin, body: { email, role } })).status).toBe(200);
    }
    const viewer = await api.login('viewer@example.test');
    const roles = async (token: string) => (await api.request('GET', '/api/me', { token })).body.memberships.map((m: { projectKey: string; role: string }) => `${m.projectKey} ${m.role}`);
    expect(await roles(viewer)).toEqual(['alpha-dsp viewer', 'echo-amp qa_manager']);
    expect(await roles(admin)).toContain('echo-amp viewer');

    expect((await api.request('PATCH', '/api/projects/echo-amp', { token: admin, body: { archived: true } })).status).toBe(200);
    expect(await roles(viewer)).toEqual(['alpha-dsp viewer']);
    expect(await roles(admin)).not.toContain('echo-amp viewer');
    const signedIn = await signIn('viewer@example.test', TEST_PASSWORD);
    expect(signedIn.body.user.memberships.map((m: { projectKey: string }) => m.projectKey)).toEqual(['alpha-dsp']);

    expect((await api.request('PATCH', '/api/projects/echo-amp', { token: admin, body: { archived: false } })).status).toBe(200);
    expect(await roles(viewer)).toEqual(['alpha-dsp viewer', 'echo-amp qa_manager']);
  });
});
