import { describe, expect, it } from 'vitest';
import { useSeededDatabase } from '../src/testing/index.js';

/**
 * Migration 20261202180300: every existing revision's contributors are its author, then
 * whoever the audit log shows editing it (oldest edit first), so an edit made before only
 * authors could edit still bars its editor from deciding the revision.
 */
const seeded = useSeededDatabase();

describe('mask revision contributors migration', () => {
  it('backfills the author, then earlier editors of that very revision from the audit log', async () => {
    const migrator = seeded.orm.getMigrator();
    await migrator.down({ to: 'migration-20261202180200' });
    const sql = seeded.orm.em.getConnection();
    const { project, otherProject, users } = seeded.fixture;
    const cases = await sql.execute<{ id: string }[]>(
      `insert into test_case (id, created_at, project_id, key, name, stimulus, analysis, channel_map, updated_at) values
         (gen_random_uuid(), now(), ?, 'tone', 'Tone', '{"kind":"silence"}', '{}', '[]', now()),
         (gen_random_uuid(), now(), ?, 'tone', 'Tone', '{"kind":"silence"}', '{}', '[]', now()) returning id`,
      [project.id, otherProject.id],
    );
    const [tone, otherTone] = cases.map((r) => r.id) as [string, string];
    for (const [testCase, revision] of [[tone, 1], [tone, 2], [otherTone, 1]] as const) {
      await sql.execute(
        `insert into mask_revision (id, created_at, test_case_id, revision, state, checks, note, author_id) values (gen_random_uuid(), now(), ?, ?, 'in_review', '[]', '', ?)`,
        [testCase, revision, users.engineer.id],
      );
    }
    const event = (minutesAgo: number, actor: string, action: string, subject: string, projectId: string) =>
      sql.execute(
        `insert into audit_event (id, created_at, actor, action, subject, project_id, details) values (gen_random_uuid(), now() - make_interval(mins => ?), ?, ?, ?, ?, '{}')`,
        [minutesAgo, actor, action, subject, projectId],
      );
    // Revision 2: the author edits, then the admin, then the QA manager twice.
    await event(50, 'user:engineer@example.test', 'mask.edit', 'mask:tone#2', project.id);
    await event(40, 'user:admin@example.test', 'mask.edit', 'mask:tone#2', project.id);
    await event(30, 'user:qa_manager@example.test', 'mask.edit', 'mask:tone#2', project.id);
    await event(20, 'user:qa_manager@example.test', 'mask.edit', 'mask:tone#2', project.id);
    // Not edits of revision 1 of alpha-dsp: another action, another revision, another project's case of the same key.
    await event(10, 'user:viewer@example.test', 'mask.submit', 'mask:tone#1', project.id);
    await event(10, 'user:viewer@example.test', 'mask.edit', 'mask:tone#12', project.id);
    await event(10, 'user:outsider@example.test', 'mask.edit', 'mask:tone#1', otherProject.id);

    await migrator.up();

    const rows = await sql.execute<{ project_id: string; revision: number; contributors: string[] }[]>(
      `select t.project_id, m.revision, m.contributors from mask_revision m join test_case t on t.id = m.test_case_id order by t.project_id = ? desc, m.revision`,
      [project.id],
    );
    expect(rows).toEqual([
      { project_id: project.id, revision: 1, contributors: [users.engineer.id] },
      { project_id: project.id, revision: 2, contributors: [users.engineer.id, users.admin.id, users.qa_manager.id] },
      { project_id: otherProject.id, revision: 1, contributors: [users.engineer.id, users.outsider.id] },
    ]);
    const column = await sql.execute<{ is_nullable: string; data_type: string }[]>(
      `select is_nullable, data_type from information_schema.columns where table_name = 'mask_revision' and column_name = 'contributors'`,
    );
    expect(column).toEqual([{ is_nullable: 'NO', data_type: 'jsonb' }]);
  });
});
