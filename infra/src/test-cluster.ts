import { initOrm, migrate } from '@earmark/db';
import { createDatabase, dropDatabase, startCluster, type Cluster } from './postgres.js';
import { loadSettings } from './settings.js';

export const TEMPLATE_DB = 'earmark_template';

export interface TestCluster {
  cluster: Cluster;
  /** Admin URL of the `postgres` database; tests create their own databases from the template. */
  adminUrl: string;
  templateDb: string;
}

/**
 * Starts the throwaway test cluster (fsync off) and rebuilds a migrated template
 * database, so every test file can clone a fresh, migrated database in milliseconds.
 */
export async function startTestCluster(log: (l: string) => void = () => {}): Promise<TestCluster> {
  const settings = loadSettings();
  const cluster = await startCluster({ name: 'pg-test', port: settings.EARMARK_TEST_PG_PORT, fsync: false, log });
  await dropDatabase(cluster, TEMPLATE_DB);
  await createDatabase(cluster, TEMPLATE_DB);
  const orm = await initOrm({ url: cluster.url(TEMPLATE_DB), poolMax: 2 });
  try {
    await migrate(orm);
  } finally {
    await orm.close();
  }
  return { cluster, adminUrl: cluster.url('postgres'), templateDb: TEMPLATE_DB };
}
