import type { MikroORM } from '@mikro-orm/postgresql';
import { afterAll, beforeAll } from 'vitest';
import { initOrm } from '../orm.js';
import { seedRoles, type RoleFixture } from '../seeders/index.js';
import { createTestDatabase, type TestDatabase } from './test-database.js';

export interface SeededDatabase {
  db: TestDatabase;
  orm: MikroORM;
  /** alpha-dsp with one user per role (seedRoles). */
  fixture: RoleFixture;
}

/**
 * For a test file: its own database cloned from the migrated template, with the role fixture
 * seeded before the first test and dropped after the last. Read the fields inside tests (they
 * are filled in by `beforeAll`).
 */
export function useSeededDatabase(poolMax = 2): SeededDatabase {
  const seeded = {} as SeededDatabase;
  beforeAll(async () => {
    seeded.db = await createTestDatabase();
    seeded.orm = await initOrm({ url: seeded.db.url, poolMax });
    seeded.fixture = await seedRoles(seeded.orm.em.fork());
  });
  afterAll(async () => {
    await seeded.orm?.close();
    await seeded.db?.drop();
  });
  return seeded;
}
