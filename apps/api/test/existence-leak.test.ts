import { randomUUID } from 'node:crypto';
import { ApiToken, Build, Capture, Target, TestCase } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi, type TestResponse } from './support/test-api.js';

/**
 * A caller outside a project must not tell "no such thing" from "it is someone else's":
 * both answer the same 404, word for word.
 */
let api: TestApi;
let betaToken: string;
let alphaCaptureId = '';

beforeAll(async () => {
  api = await startTestApi();
  const { project, otherProject, users } = api.fixture;
  const em = api.orm.em.fork();
  const secret = generateTokenSecret();
  em.create(ApiToken, { project: otherProject.id, name: 'beta-ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: users.admin.id });
  const testCase = em.create(TestCase, { project: project.id, key: 'leak.case', name: 'leak', stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 } });
  const target = em.create(Target, { project: project.id, key: 'leak-target', name: 'leak' });
  const build = em.create(Build, { project: project.id, sha: 'feedf00d1' });
  const capture = em.create(Capture, { project: project.id, build, testCase, target, objectKey: 'leak/capture.wav', sha256: '0'.repeat(64), sizeBytes: 44, format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 0 });
  await em.flush();
  betaToken = secret.token;
  alphaCaptureId = capture.id;
});
afterAll(() => api.close());

/** The answer with the asked-for id and URL masked, so answers for two ids can be compared byte for byte. */
function shape(res: TestResponse, id: string): string {
  return `${res.status} ${res.contentType}\n${res.text.split(id).join('<id>')}`;
}

describe('looking up a capture of another project', () => {
  it('answers a non-member and a foreign CI token exactly as for a capture that does not exist', async () => {
    const outsider = await api.login('outsider@example.test');
    const randomId = randomUUID();
    const answers = {
      outsiderExisting: await api.request('GET', `/api/v1/captures/${alphaCaptureId}`, { token: outsider }),
      outsiderRandom: await api.request('GET', `/api/v1/captures/${randomId}`, { token: outsider }),
      tokenExisting: await api.request('GET', `/api/v1/captures/${alphaCaptureId}`, { token: betaToken }),
      tokenRandom: await api.request('GET', `/api/v1/captures/${randomId}`, { token: betaToken }),
    };

    expect(answers.outsiderExisting.status).toBe(404);
    expect(answers.outsiderExisting.body).toMatchObject({
      status: 404,
      title: 'Not found',
      detail: `There is no capture ${alphaCaptureId}, or you have no access to it.`,
    });
    expect(answers.outsiderExisting.text).not.toContain('alpha-dsp');
    // same caller, existing vs random id: identical but for the id itself
    expect(shape(answers.outsiderExisting, alphaCaptureId)).toBe(shape(answers.outsiderRandom, randomId));
    expect(shape(answers.tokenExisting, alphaCaptureId)).toBe(shape(answers.tokenRandom, randomId));
    // a non-member and a foreign token asking for the same id: byte-identical
    expect(answers.tokenExisting.text).toBe(answers.outsiderExisting.text);
    expect(answers.tokenRandom.text).toBe(answers.outsiderRandom.text);
  });

  it('still shows the capture to a member and to its own project’s token', async () => {
    const viewer = await api.login('viewer@example.test');
    const res = await api.request('GET', `/api/v1/captures/${alphaCaptureId}`, { token: viewer });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: alphaCaptureId, projectKey: 'alpha-dsp' });
  });
});

describe('a project named in the path', () => {
  it('answers a foreign CI token and a non-member the same 404 as for a project that does not exist', async () => {
    const outsider = await api.login('outsider@example.test');
    const existing = { outsider: await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: outsider }), token: await api.request('GET', '/api/v1/projects/alpha-dsp/builds', { token: betaToken }) };
    const missing = { outsider: await api.request('GET', '/api/v1/projects/gamma-dsp/builds', { token: outsider }), token: await api.request('GET', '/api/v1/projects/gamma-dsp/builds', { token: betaToken }) };

    expect(existing.token.status).toBe(404);
    expect(existing.token.body).toMatchObject({ status: 404, title: 'Not found', detail: 'There is no project alpha-dsp, or you have no access to it.' });
    expect(existing.token.text).not.toContain('beta-dsp');
    expect(existing.token.text).toBe(existing.outsider.text);
    expect(missing.token.text).toBe(missing.outsider.text);
    expect(shape(existing.token, 'alpha-dsp')).toBe(shape(missing.token, 'gamma-dsp'));
  });

  it('keeps 403 for a member whose role lacks the permission', async () => {
    const viewer = await api.login('viewer@example.test');
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: viewer, body: { sha: 'abcdef12' } });
    expect(res.status).toBe(403);
    expect(res.body.detail).toContain('viewer');
  });
});

describe('the pipeline link of a build', () => {
  it.each(['javascript:alert(document.cookie)', 'data:text/html,<script>alert(1)</script>', 'vbscript:msgbox(1)', 'JavaScript:alert(1)', 'ftp://ci.example.test/1'])(
    'refuses %s with 422 naming the field, and stores nothing',
    async (pipelineUrl) => {
      const engineer = await api.login('engineer@example.test');
      const sha = 'abc' + Math.floor(Math.random() * 1e9).toString(16).padStart(8, '0');
      const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: engineer, body: { sha, pipelineUrl } });
      expect(res.status).toBe(422);
      expect(res.body.errors).toEqual([expect.objectContaining({ path: 'body.pipelineUrl', message: 'an http(s) URL' })]);
      expect(await api.orm.em.fork().count(Build, { sha })).toBe(0);
    },
  );

  it('accepts an https link', async () => {
    const engineer = await api.login('engineer@example.test');
    const res = await api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: engineer, body: { sha: 'abcdef0123', pipelineUrl: 'https://ci.example.test/pipelines/41' } });
    expect(res.status).toBeLessThan(300);
    expect(res.body.pipelineUrl).toBe('https://ci.example.test/pipelines/41');
  });
});
