import { Build } from '@earmark/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApi, type TestApi } from './support/test-api.js';

/** `builtAt`: the CI's "time the build was made", which orders builds everywhere. */
let api: TestApi;
let engineer: string;

beforeAll(async () => {
  api = await startTestApi();
  engineer = await api.login('engineer@example.test');
});
afterAll(() => api.close());

const upsert = (body: Record<string, unknown>) => api.request('POST', '/api/v1/projects/alpha-dsp/builds', { token: engineer, body });

describe('the time a build was made', () => {
  it('is stored as the build time and orders the builds table, newest first', async () => {
    const older = await upsert({ sha: 'b11a0000001', builtAt: '2026-10-20T08:30:00Z', branch: 'main' });
    expect(older.status).toBe(201);
    expect(older.body.createdAt).toBe('2026-10-20T08:30:00.000Z');
    // Sent later, made earlier: it sorts below the first one.
    const oldest = await upsert({ sha: 'b11a0000002', builtAt: '2026-10-19T23:00:00+02:00' });
    expect(oldest.body.createdAt).toBe('2026-10-19T21:00:00.000Z');
    const list = await api.request('GET', '/api/v1/projects/alpha-dsp/builds?pageSize=10', { token: engineer });
    expect(list.body.items.map((b: { sha: string }) => b.sha)).toEqual(['b11a0000001', 'b11a0000002']);
  });

  it('is kept when the build is sent again', async () => {
    const again = await upsert({ sha: 'b11a0000001', builtAt: '2026-11-01T00:00:00Z', label: 'nightly 12' });
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ label: 'nightly 12', createdAt: '2026-10-20T08:30:00.000Z' });
  });

  it('defaults to when Earmark first hears of the build', async () => {
    const before = Date.now();
    const res = await upsert({ sha: 'b11a0000003' });
    expect(Date.parse(res.body.createdAt)).toBeGreaterThanOrEqual(before - 1000);
  });

  it.each([
    ['a time in the future', new Date(Date.now() + 3_600_000).toISOString(), 'lies in the future: give the time the build was made'],
    ['a date-time without a time zone', '2026-10-20T08:30:00', 'an ISO 8601 date-time with a time zone, e.g. 2026-11-30T22:15:00Z'],
    ['a date before 2000', '1999-12-31T23:59:59Z', 'lies before the year 2000'],
  ])('refuses %s with 422 naming the field, and stores nothing', async (_, builtAt, message) => {
    const res = await upsert({ sha: 'b11a00000ff', builtAt });
    expect(res.status).toBe(422);
    expect(res.body.errors).toEqual([expect.objectContaining({ path: 'body.builtAt', message })]);
    expect(await api.orm.em.fork().count(Build, { sha: 'b11a00000ff' })).toBe(0);
  });
});
