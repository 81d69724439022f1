import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { DEFAULT_OUTSIDE_ROOT } from '../cluster-place.js';
import { startDevDatabase } from '../dev-database.js';
import { destroyCluster } from '../postgres.js';
import { repoRoot } from '../paths.js';
import { loadSettings } from '../settings.js';

const usage = `npm run db -- <url | migrate | migration:create | migration:check | stop | destroy>`;
const subcommands = ['url', 'migrate', 'migration:create', 'migration:check', 'stop', 'destroy'];

/**
 * Developer database chores. `migration:create` diffs the entities against the
 * migrated dev database and writes a new migration (add it to migrations/index.ts).
 * `destroy` stops the development and test clusters and removes their folders, inside
 * the clone or outside it (see cluster-place.ts).
 */
export async function dbCommand(args: string[]): Promise<number> {
  const settings = loadSettings();
  const log = (l: string) => console.error(l);
  const [sub] = args;
  if (!sub || !subcommands.includes(sub)) {
    console.error(`usage: ${usage}`);
    return 2;
  }
  if (sub === 'destroy') return destroyClusters(log);
  const { cluster, url } = await startDevDatabase(settings, log);
  if (sub === 'url') console.log(url);
  if (sub === 'stop') cluster.stop();
  if (sub.startsWith('migration:')) {
    const cli = path.join(repoRoot, 'packages/db/node_modules/.bin/mikro-orm');
    const res = spawnSync(cli, [sub, ...args.slice(1)], {
      cwd: path.join(repoRoot, 'packages/db'),
      stdio: 'inherit',
      env: { ...process.env, EARMARK_DATABASE_URL: url, NODE_OPTIONS: '--import tsx' },
    });
    return res.status ?? 1;
  }
  return 0;
}

function destroyClusters(log: (l: string) => void): number {
  for (const name of ['pg', 'pg-test']) {
    const removed = destroyCluster({ name });
    log(removed ? `Removed the ${name} cluster (${removed}).` : `No ${name} cluster to remove.`);
  }
  // Earlier versions keyed the outside folder by the repository path (12 hex digits) and
  // left it root-owned after a failed initdb; nothing in it is worth keeping.
  const legacy = path.join(DEFAULT_OUTSIDE_ROOT, createHash('sha256').update(repoRoot).digest('hex').slice(0, 12));
  if (fs.existsSync(legacy)) {
    fs.rmSync(legacy, { recursive: true, force: true });
    log(`Removed ${legacy} (left by an earlier version).`);
  }
  return 0;
}
