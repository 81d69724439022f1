import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

let api: TestApi;
beforeAll(async () => {
  api = await startTestApi();
});
afterAll(() => api.close());

describe('OpenAPI document', () => {
  it('describes every mounted route, generated from the route table and zod schemas', async () => {
    const res = await api.request('GET', '/api/v1/openapi.json');
    expect(res.status).toBe(200);
    const doc = res.body;
    expect(doc.openapi).toBe('3.1.0');
    const documented = Object.entries(doc.paths as Record<string, Record<string, unknown>>).flatMap(([path, ops]) =>
      Object.keys(ops).map((m) => `${m.toUpperCase()} ${path.replace(/\{(\w+)\}/g, ':$1')}`),
    );
    expect(documented.sort()).toEqual(api.routes.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort());
  });

  it('carries the request and response schemas of the CI upload path', async () => {
    const doc = (await api.request('GET', '/api/v1/openapi.json')).body;
    const upload = doc.paths['/api/v1/projects/{project}/builds/{sha}/captures'].post;
    expect(Object.keys(upload.requestBody.content)).toEqual(['audio/wav', 'application/x-earmark-f32le', 'multipart/form-data']);
    const answer = upload.responses['202'].content['application/json'].schema;
    expect(answer.properties).toHaveProperty('verdict');
    expect(answer.required).toContain('sha256');
    const login = doc.paths['/api/auth/login'].post;
    expect(login.requestBody.content['application/json'].schema.properties).toHaveProperty('email');
    expect(login.responses.default.content).toHaveProperty('application/problem+json');
  });

  it('serves a browsable reference page', async () => {
    const res = await fetch(`${api.baseUrl}/api/docs`);
    const html = await res.text();
    expect(res.headers.get('content-type')).toMatch(/text\/html/);
    expect(html).toContain('/api/v1/projects/{project}/builds/{sha}/captures');
    expect(html).toContain('Upload a capture');
  });
});
