import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { startDevDatabase } from '../dev-database.js';
import { repoRoot } from '../paths.js';
import { loadSettings } from '../settings.js';

const usage = `npm run db -- <url | migrate | migration:create | migration:check | stop>`;

/**
 * Developer database chores. `migration:create` diffs the entities against the
 * migrated dev database and writes a new migration (add it to migrations/index.ts).
 */
export async function dbCommand(args: string[]): Promise<number> {
  const settings = loadSettings();
  const log = (l: string) => console.error(l);
  const [sub] = args;
  if (!sub || !['url', 'migrate', 'migration:create', 'migration:check', 'stop'].includes(sub)) {
    console.error(`usage: ${usage}`);
    return 2;
  }
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
