import pg from 'pg';
import { startTestCluster } from '@earmark/infra/test-cluster';

/** A fresh migrated database on the private test cluster, for scripts that run outside vitest. */
export async function createBenchDatabase(prefix: string): Promise<{ url: string; drop(): Promise<void> }> {
  const { cluster, templateDb } = await startTestCluster();
  const name = `${prefix}_${Date.now()}`;
  const admin = new pg.Client({ connectionString: cluster.url('postgres') });
  await admin.connect();
  await admin.query(`create database "${name}" template "${templateDb}"`);
  await admin.end();
  return {
    url: cluster.url(name),
    async drop() {
      const c = new pg.Client({ connectionString: cluster.url('postgres') });
      await c.connect();
      await c.query(`drop database if exists "${name}" with (force)`);
      await c.end();
    },
  };
}
