import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { initOrm, migrate } from '@earmark/db';
import { repoRoot } from './paths.js';
import { startCluster, type Cluster } from './postgres.js';
import { loadSettings } from './settings.js';

export interface TestCluster {
  cluster: Cluster;
  /** Admin URL of the `postgres` database; tests create their own databases from the template. */
  adminUrl: string;
  templateDb: string;
}

const TEMPLATE_LOCK = 720_301; // any constant: serialises template creation across concurrent runs

/** The template's name follows the migrations, so a changed schema gets a new template. */
function templateName(): string {
  const dir = path.join(repoRoot, 'packages', 'db', 'src', 'migrations');
  const hash = createHash('sha256');
  for (const file of fs.readdirSync(dir).sort()) hash.update(file).update(fs.readFileSync(path.join(dir, file)));
  return `earmark_tpl_${hash.digest('hex').slice(0, 12)}`;
}

/**
 * Starts the throwaway test cluster (fsync off) and makes sure a migrated template
 * database exists, so every test file can clone a fresh, migrated database in
 * milliseconds. Safe when several test runs start at once.
 */
export async function startTestCluster(log: (l: string) => void = () => {}): Promise<TestCluster> {
  const settings = loadSettings();
  const cluster = await startCluster({ name: 'pg-test', port: settings.EARMARK_TEST_PG_PORT, fsync: false, log });
  const templateDb = templateName();
  const admin = new pg.Client({ connectionString: cluster.url('postgres') });
  await admin.connect();
  try {
    await admin.query('select pg_advisory_lock($1)', [TEMPLATE_LOCK]);
    const exists = await admin.query('select 1 from pg_database where datname = $1', [templateDb]);
    if (exists.rowCount === 0) {
      await admin.query(`create database "${templateDb}_building"`).catch(async () => {
        await admin.query(`drop database "${templateDb}_building" with (force)`);
        await admin.query(`create database "${templateDb}_building"`);
      });
      const orm = await initOrm({ url: cluster.url(`${templateDb}_building`), poolMax: 2 });
      try {
        await migrate(orm);
      } finally {
        await orm.close();
      }
      // Renamed only when complete, so a half-migrated template is never cloned.
      await admin.query(`alter database "${templateDb}_building" rename to "${templateDb}"`);
    }
  } finally {
    await admin.query('select pg_advisory_unlock($1)', [TEMPLATE_LOCK]).catch(() => {});
    await admin.end();
  }
  return { cluster, adminUrl: cluster.url('postgres'), templateDb };
}

/**
 * Drops the per-file databases and demo snapshots (tests/support/demo-snapshot.ts) a crashed
 * run may have left behind, then stops the cluster.
 */
export async function cleanUpTestCluster(): Promise<void> {
  const { cluster } = await startTestCluster();
  const admin = new pg.Client({ connectionString: cluster.url('postgres') });
  await admin.connect();
  try {
    const { rows } = await admin.query<{ datname: string }>(`select datname from pg_database where datname like 'earmark\\_t\\_%' or datname like 'earmark\\_demo\\_snapshot\\_%'`);
    for (const { datname } of rows) await admin.query(`drop database if exists "${datname}" with (force)`);
  } finally {
    await admin.end();
  }
  for (const name of fs.readdirSync(os.tmpdir())) if (name.startsWith('earmark-demo-snapshot-')) fs.rmSync(path.join(os.tmpdir(), name), { recursive: true, force: true });
  cluster.stop();
}
