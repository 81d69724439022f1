import { aggregateBuildStatus, captureStateOf, type BuildDetail, type BuildMatrix, type BuildsPage, type BuildStatus, type BuildTrend, type CaptureState, type MatrixCell } from '@earmark/contracts';
import { EXIT, exitCodeFor } from '@earmark/cli';
import { DEMO_PASSWORD } from '@earmark/db';
import { DEMO_BUILDS, DEMO_MOMENTS } from '@earmark/infra/demo-story';
import { XMLParser } from 'fast-xml-parser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startDemoHistory } from '../support/demo-history.js';
import type { Stack } from '../support/stack.js';

/**
 * One build, one status, wherever it is read: the dashboard's builds table and trend, the
 * build page's matrix, the CI API, the JUnit report and the CLI's exit code all agree for
 * every build of the demo history (sent through the real pipeline), including a build with
 * one failing and one erroring capture, where an error outranks the failure.
 */
let stack: Stack;
let session: string;

beforeAll(async () => {
  stack = await startDemoHistory();
  const login = await fetch(`${stack.url}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email: 'engineer@fernwick.test', password: DEMO_PASSWORD }),
  });
  expect(login.status).toBe(200);
  session = ((await login.json()) as { accessToken: string }).accessToken;
}, 420_000); // the six-week demo history is seeded through the pipeline first
afterAll(() => stack?.close());

async function get(path: string, token: string): Promise<Response> {
  const res = await fetch(`${stack.url}${path}`, { headers: { authorization: `Bearer ${token}` } });
  expect(res.status, `${path}: ${res.status}`).toBe(200);
  return res;
}
const asDashboard = async <T>(path: string): Promise<T> => (await get(path, session)).json() as Promise<T>;
const asCi = async <T>(path: string): Promise<T> => (await get(path, stack.ciToken)).json() as Promise<T>;

/** A matrix cell as the rule sees a capture (the cell shows the newest verdict, or pending without one). */
const cellState = (cell: MatrixCell): CaptureState =>
  cell.outcome === 'pending' ? { status: 'queued', outcome: null } : { status: cell.outcome === 'error' ? 'error' : 'done', outcome: cell.outcome };

/** What a CI system's test-report feature concludes: errors > 0 is an error, else failures > 0 a failure. */
function junitStatus(xml: string): { status: BuildStatus; tests: number } {
  const root = (new XMLParser({ ignoreAttributes: false }).parse(xml) as { testsuites: Record<string, string> }).testsuites;
  const [tests, failures, errors] = ['@_tests', '@_failures', '@_errors'].map((k) => Number(root[k] ?? 0)) as [number, number, number];
  return { status: errors > 0 ? 'error' : failures > 0 ? 'fail' : 'pass', tests };
}

const STATUS_OF_EXIT: Record<number, BuildStatus> = { [EXIT.ok]: 'pass', [EXIT.fail]: 'fail', [EXIT.error]: 'error' };

describe('every surface shows the same build status', () => {
  it('for every demo build: builds table, trend, matrix, CI API, JUnit and the CLI agree', async () => {
    const table = await asDashboard<BuildsPage>('/api/projects/kestrel-buds/builds?pageSize=100');
    const trend = await asDashboard<BuildTrend>('/api/projects/kestrel-buds/builds/trend');
    expect(table.items.length).toBe(DEMO_BUILDS.length);

    const seen: Record<string, Record<string, unknown>> = {};
    for (const row of table.items) {
      const ci = await asCi<BuildDetail>(`/api/v1/projects/kestrel-buds/builds/${row.sha}`);
      const matrix = await asDashboard<BuildMatrix>(`/api/projects/kestrel-buds/builds/${row.sha}/matrix`);
      const junit = junitStatus(await (await get(`/api/v1/projects/kestrel-buds/builds/${row.sha}/junit.xml`, stack.ciToken)).text());
      const cliCode = exitCodeFor(ci.captures, true);
      seen[row.sha] = {
        table: row.status,
        trend: trend.points.find((p) => p.sha === row.sha)?.status,
        buildPage: matrix.build.status,
        matrixCells: aggregateBuildStatus(matrix.cells.map(cellState)),
        ci: ci.status,
        ciCaptures: aggregateBuildStatus(ci.captures.map(captureStateOf)),
        junit: junit.status,
        cli: STATUS_OF_EXIT[cliCode] ?? `exit ${cliCode}`,
      };
      expect(junit.tests, `${row.sha}: JUnit has a testcase per check or verdict`).toBeGreaterThanOrEqual(ci.captures.length);
    }
    // One object for all builds, so a disagreement shows every surface of every build at once.
    const agreed = Object.fromEntries(Object.entries(seen).map(([sha, surfaces]) => [sha, Object.fromEntries(Object.keys(surfaces).map((k) => [k, surfaces.table]))]));
    expect(seen).toEqual(agreed);
    // The history is judged and covers each outcome.
    expect(new Set(Object.values(seen).map((s) => s.table))).toEqual(new Set(['pass', 'fail', 'error']));
  });

  it('a build with one failing and one erroring capture is an error everywhere, and the CLI exits 2', async () => {
    const builds = (await asDashboard<BuildsPage>('/api/projects/kestrel-buds/builds?pageSize=100')).items;
    const mixed: string[] = [];
    for (const b of builds) {
      const ci = await asCi<BuildDetail>(`/api/v1/projects/kestrel-buds/builds/${b.sha}`);
      if (ci.counts.fail > 0 && ci.counts.error > 0) {
        mixed.push(b.sha);
        expect([b.status, ci.status, exitCodeFor(ci.captures, true)], b.sha).toEqual(['error', 'error', EXIT.error]);
      }
    }
    // The demo's nightly 399: the quantised-EQ bump fails, the voice uplink (no approved mask) errors.
    const bumpSha = DEMO_BUILDS.find((b) => b.label === DEMO_MOMENTS.quantisedEq)!.sha;
    expect(mixed).toContain(bumpSha);
    const filtered = await asDashboard<BuildsPage>('/api/projects/kestrel-buds/builds?status=error');
    expect(filtered.items.map((b) => b.sha)).toContain(bumpSha);
  });
});
