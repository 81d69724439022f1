import { initOrm, migrate } from '@earmark/db';
import { createDatabase, databaseExists, startCluster, type Cluster } from './postgres.js';
import type { Settings } from './settings.js';

/** The development cluster and database that `npm start` uses, migrated. */
export async function startDevDatabase(settings: Settings, log: (l: string) => void): Promise<{ cluster: Cluster; url: string }> {
  const cluster = await startCluster({ name: 'pg', port: settings.EARMARK_PG_PORT, fsync: true, log });
  if (!(await databaseExists(cluster, settings.EARMARK_DB_NAME))) {
    log(`Creating database ${settings.EARMARK_DB_NAME}…`);
    await createDatabase(cluster, settings.EARMARK_DB_NAME);
  }
  const url = cluster.url(settings.EARMARK_DB_NAME);
  const orm = await initOrm({ url, poolMax: 2 });
  try {
    const applied = await migrate(orm);
    if (applied.length) log(`Applied migrations: ${applied.join(', ')}`);
  } finally {
    await orm.close();
  }
  return { cluster, url };
}
