import pg from 'pg';
import { initOrm, seedRoles } from '@earmark/db';
import { createTestDatabase, type TestDatabase } from '@earmark/db/testing';
import { LAST_PASSING_SQL } from '@earmark/domain';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const CAPTURES = 100_000;
let db: TestDatabase;
let client: pg.Client;
let where: [string, string, string, Date];

interface PlanNode {
  'Node Type': string;
  'Actual Loops': number;
  'Actual Rows': number;
  'Index Name'?: string;
  'Subplan Name'?: string;
  Plans?: PlanNode[];
}
const nodes = (n: PlanNode): PlanNode[] => [n, ...(n.Plans ?? []).flatMap(nodes)];

beforeAll(async () => {
  db = await createTestDatabase();
  const orm = await initOrm({ url: db.url, poolMax: 2 });
  const { project } = await seedRoles(orm.em.fork());
  await orm.close();
  client = new pg.Client({ connectionString: db.url });
  await client.connect();
  const p = project.id;
  await client.query(`insert into target (id, created_at, project_id, key, name) values (gen_random_uuid(), now(), $1, 'board', 'Board')`, [p]);
  await client.query(`insert into test_case (id, created_at, updated_at, project_id, key, name, stimulus, analysis, channel_map) values (gen_random_uuid(), now(), now(), $1, 'eq', 'EQ', '{"kind":"silence","sampleRate":48000,"seconds":1}', '{}', '[]')`, [p]);
  await client.query(
    `insert into build (id, created_at, updated_at, project_id, sha, branch, label, status)
     select gen_random_uuid(), now() - (g || ' minutes')::interval, now(), $1, lpad(to_hex(g), 10, '0'), 'main', 'b', 'pass' from generate_series(1, $2::int) g`,
    [p, CAPTURES],
  );
  await client.query(
    `insert into capture (id, created_at, project_id, build_id, test_case_id, target_id, object_key, sha256, size_bytes, format, sample_rate, channel_count, frames, status)
     select gen_random_uuid(), b.created_at, b.project_id, b.id, tc.id, t.id, 'x', repeat('0', 64), 1, '{"container":"wav"}', 48000, 1, 48000, 'done'
       from build b cross join target t cross join test_case tc where b.project_id = $1`,
    [p],
  );
  // The newest 2,000 captures failed: the last pass lies deep in the history.
  await client.query(
    `insert into verdict (id, created_at, capture_id, outcome, engine_version)
     select gen_random_uuid(), c.created_at, c.id, case when row_number() over (order by c.created_at desc) <= 2000 then 'fail' else 'pass' end, 'x' from capture c`,
  );
  await client.query('analyze');
  const { rows } = await client.query<{ project_id: string; test_case_id: string; target_id: string; created_at: Date }>(
    'select c.project_id, c.test_case_id, c.target_id, b.created_at from capture c join build b on b.id = c.build_id order by b.created_at desc limit 1',
  );
  where = [rows[0]!.project_id, rows[0]!.test_case_id, rows[0]!.target_id, rows[0]!.created_at];
}, 240_000);
afterAll(async () => {
  await client?.end();
  await db?.drop();
});

describe('the last passing capture at 100,000 captures of one test case', () => {
  it('walks back from the newest build and stops at the first pass instead of judging the whole history', async () => {
    let i = 0;
    const sql = LAST_PASSING_SQL.replace(/\?/g, () => `$${++i}`);
    const { rows } = await client.query<{ 'QUERY PLAN': [{ Plan: PlanNode }] }>(`explain (analyze, format json) ${sql}`, where);
    const plan = nodes(rows[0]!['QUERY PLAN'][0].Plan);
    // Builds are read newest first through the project's (project_id, created_at desc) index, never all scanned and sorted.
    expect(plan.map((n) => n['Node Type'])).not.toContain('Seq Scan');
    const builds = plan.find((n) => n['Index Name'] === 'build_project_created_at_idx');
    expect(builds?.['Actual Rows']).toBeLessThanOrEqual(2001);
    const found = await client.query<{ sha: string }>(sql, where);
    expect(found.rows[0]!.sha).toBe((2001).toString(16).padStart(10, '0'));
    // The newest verdict is looked up for the 2,001 newest captures, not for 100,000.
    const verdictLookups = Math.max(...plan.filter((n) => JSON.stringify(n).includes('verdict')).map((n) => n['Actual Loops']));
    expect(verdictLookups).toBeLessThanOrEqual(2001);
  });
});
