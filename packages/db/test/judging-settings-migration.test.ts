import { describe, expect, it } from 'vitest';
import { useSeededDatabase } from '../src/testing/index.js';

/** Migration 20261202180400: existing revisions take their test case's settings; old verdicts keep none. */
const seeded = useSeededDatabase();

describe('judging settings migration', () => {
  it('backfills every existing revision from its own test case and leaves old verdicts without settings', async () => {
    const migrator = seeded.orm.getMigrator();
    await migrator.down({ to: 'migration-20261202143502' });
    const sql = seeded.orm.em.getConnection();
    const stimulus = { kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 997, levelDbfs: -12 };
    const rows = await sql.execute<{ id: string }[]>(
      `insert into test_case (id, created_at, project_id, key, name, stimulus, analysis, channel_map, updated_at) values
         (gen_random_uuid(), now(), ?, 'left', 'Left', ?, ?, ?, now()),
         (gen_random_uuid(), now(), ?, 'all', 'All', ?, '{}', '[]', now()) returning id`,
      [seeded.fixture.project.id, JSON.stringify(stimulus), JSON.stringify({ transferMethod: 'h1' }), JSON.stringify([0]), seeded.fixture.project.id, JSON.stringify({ kind: 'silence', sampleRate: 48000, seconds: 1 })],
    );
    const [left, all] = rows.map((r) => r.id) as [string, string];
    for (const [testCase, revision] of [[left, 1], [left, 2], [all, 1]] as const) {
      await sql.execute(
        `insert into mask_revision (id, created_at, test_case_id, revision, state, checks, note, author_id) values (gen_random_uuid(), now(), ?, ?, 'draft', '[]', '', ?)`,
        [testCase, revision, seeded.fixture.users.engineer.id],
      );
    }

    await migrator.up();

    const revisions = await sql.execute<{ key: string; revision: number; settings: unknown }[]>(
      `select t.key, m.revision, m.settings from mask_revision m join test_case t on t.id = m.test_case_id order by t.key, m.revision`,
    );
    expect(revisions).toEqual([
      { key: 'all', revision: 1, settings: { stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 }, analysis: {}, channelMap: [] } },
      { key: 'left', revision: 1, settings: { stimulus, analysis: { transferMethod: 'h1' }, channelMap: [0] } },
      { key: 'left', revision: 2, settings: { stimulus, analysis: { transferMethod: 'h1' }, channelMap: [0] } },
    ]);
    const nullable = await sql.execute<{ table_name: string; is_nullable: string }[]>(
      `select table_name, is_nullable from information_schema.columns where column_name = 'settings' and table_name in ('mask_revision', 'verdict') order by table_name`,
    );
    expect(nullable).toEqual([{ table_name: 'mask_revision', is_nullable: 'NO' }, { table_name: 'verdict', is_nullable: 'YES' }]);
  });
});
