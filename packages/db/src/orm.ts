import { MikroORM, type EntityManager } from '@mikro-orm/postgresql';
import { createDbConfig, type DbConfigInput } from './config.js';

export type Orm = MikroORM;
export type Em = EntityManager;

/** Connects and checks the schema is migrated; callers own `orm.close()`. */
export async function initOrm(input: DbConfigInput): Promise<MikroORM> {
  return MikroORM.init(createDbConfig(input));
}

/** Applies pending migrations; returns the names applied. */
export async function migrate(orm: MikroORM): Promise<string[]> {
  const applied = await orm.getMigrator().up();
  return applied.map((m) => m.name);
}

/** The migrations this build knows that the database has not applied yet (by name, in order). */
export async function pendingMigrations(orm: MikroORM): Promise<string[]> {
  const pending = await orm.getMigrator().getPendingMigrations();
  return pending.map((m) => m.name);
}

/**
 * The schema is behind this build: a process that started anyway would fail on its first query
 * against a column that does not exist yet. Migrations are an explicit step of an upgrade.
 */
export class MigrationsPendingError extends Error {
  constructor(readonly pending: string[]) {
    super(`the database has ${pending.length} migration(s) pending (${pending.join(', ')}); run \`npm run admin -- migrate\` first (docs/operations.md, "Upgrades")`);
    this.name = 'MigrationsPendingError';
  }
}

/** @throws MigrationsPendingError when the database is behind this build */
export async function assertMigrated(orm: MikroORM): Promise<void> {
  const pending = await pendingMigrations(orm);
  if (pending.length > 0) throw new MigrationsPendingError(pending);
}
