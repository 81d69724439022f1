import { describe, expect, it } from 'vitest';
import { Membership } from '../src/index.js';
import { Migration20261202180000 } from '../src/migrations/migration-20261202180000.js';
import { useSeededDatabase } from '../src/testing/index.js';

/**
 * Migration 20261202180000: the outbox's HTML part, and build mail switched on for the engineers
 * and QA managers who had it off when the setting was not yet theirs to choose.
 */
const seeded = useSeededDatabase();

async function run(direction: 'up' | 'down'): Promise<void> {
  const migration = new Migration20261202180000(seeded.orm.em.getDriver(), seeded.orm.config);
  await migration[direction]();
  for (const sql of migration.getQueries()) await seeded.orm.em.getConnection().execute(sql as string);
}

const htmlColumn = async () =>
  (await seeded.orm.em.getConnection().execute<{ is_nullable: string }[]>(`select is_nullable from information_schema.columns where table_name = 'notification' and column_name = 'html'`))[0] ?? null;

describe('mail migration', () => {
  it('switches build mail on for engineers and QA managers, leaves viewers off, and adds a nullable html column', async () => {
    await run('down');
    expect(await htmlColumn()).toBeNull();
    // As the members API left every membership it created: off.
    await seeded.orm.em.getConnection().execute(`update membership set subscribed = false`);

    await run('up');
    expect(await htmlColumn()).toEqual({ is_nullable: 'YES' });
    const rows = await seeded.orm.em.fork().find(Membership, {}, { populate: ['user', 'project'] });
    const byMember = Object.fromEntries(rows.map((m) => [`${m.project.key}/${m.user.email}`, m.subscribed]));
    expect(byMember).toEqual({
      [`${seeded.fixture.project.key}/qa_manager@example.test`]: true,
      [`${seeded.fixture.project.key}/engineer@example.test`]: true,
      [`${seeded.fixture.project.key}/viewer@example.test`]: false,
      [`${seeded.fixture.otherProject.key}/outsider@example.test`]: true,
    });
  });
});
