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
