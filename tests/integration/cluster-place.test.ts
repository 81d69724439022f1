import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { DEFAULT_OUTSIDE_ROOT, serverAccessProblem } from '@earmark/infra/cluster-place';
import { destroyCluster, startCluster, type Cluster } from '@earmark/infra/postgres';
import { afterEach, describe, expect, it } from 'vitest';
import { freePort } from '../support/free-port.js';

// Where `npm start` and `npm test` put their PostgreSQL cluster for clones in folders the
// `postgres` user cannot enter (a home directory, a `mktemp -d` folder). CI runs as root,
// as a newcomer on a fresh Debian machine does; these tests need root to mean anything.
const asRoot = process.getuid?.() === 0;
const PASSWORD = 'cluster-place-test';

const scratch: string[] = [];
const started: { stateDir: string; cluster: Cluster }[] = [];

/** A folder made the way `mktemp -d` makes one: mode 0700, owner root. */
function privateFolder(): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'earmark-place-'));
  expect(fs.statSync(dir).mode & 0o777).toBe(0o700);
  scratch.push(dir);
  return dir;
}

/** Makes `dir` and its missing parents with mode 0755 whatever the umask. */
function openFolders(dir: string): void {
  if (fs.existsSync(dir)) return;
  openFolders(path.dirname(dir));
  fs.mkdirSync(dir);
  fs.chmodSync(dir, 0o755);
}

async function start(stateDir: string, log: string[] = []): Promise<Cluster> {
  const cluster = await startCluster({ name: 'pg', port: await freePort(), fsync: false, stateDir, password: PASSWORD, log: (l) => log.push(l) });
  started.push({ stateDir, cluster });
  return cluster;
}

async function query(cluster: Cluster, sql: string): Promise<pg.QueryResult> {
  const client = new pg.Client({ connectionString: cluster.url('postgres') });
  await client.connect();
  try {
    return await client.query(sql);
  } finally {
    await client.end();
  }
}

/** Every folder under `root` (itself included) with its mode and owner. */
function foldersUnder(root: string): { dir: string; mode: number; uid: number }[] {
  const out: { dir: string; mode: number; uid: number }[] = [];
  const walk = (dir: string) => {
    const st = fs.statSync(dir);
    out.push({ dir, mode: st.mode & 0o777, uid: st.uid });
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) if (e.isDirectory()) walk(path.join(dir, e.name));
  };
  walk(root);
  return out;
}

const postgresUid = () => Number(fs.readFileSync('/etc/passwd', 'utf8').split('\n').find((l) => l.startsWith('postgres:'))!.split(':')[2]);

afterEach(() => {
  for (const { stateDir } of started.splice(0)) destroyCluster({ name: 'pg', stateDir });
  for (const dir of scratch.splice(0)) fs.rmSync(dir, { recursive: true, force: true });
});

describe.runIf(asRoot)('cluster location for clones anywhere', () => {
  it('starts, reuses and destroys the cluster of a clone in a 0700 folder with a space in its name', async () => {
    const stateDir = path.join(privateFolder(), 'my earmark clone', '.data');
    const firstLog: string[] = [];
    const cluster = await start(stateDir, firstLog);
    expect(firstLog.some((l) => l.startsWith('Initialising'))).toBe(true);

    // The postgres user cannot enter the clone, so the cluster lives outside it.
    expect(cluster.dataDir.startsWith(`${DEFAULT_OUTSIDE_ROOT}/`)).toBe(true);
    expect(fs.existsSync(path.join(stateDir, 'pg'))).toBe(false);
    expect((await query(cluster, 'select 1 as one')).rows).toEqual([{ one: 1 }]);
    await query(cluster, 'create table survives_restart (id int)');

    // Reachable only where it must be: the outside root lets postgres pass (0711, root's),
    // the clone's folder and the data directory are postgres's alone; nothing world-writable.
    const outsideDir = path.dirname(cluster.dataDir);
    const rootStat = fs.statSync(DEFAULT_OUTSIDE_ROOT);
    expect({ mode: rootStat.mode & 0o777, uid: rootStat.uid }).toEqual({ mode: 0o711, uid: 0 });
    for (const f of foldersUnder(outsideDir)) {
      expect(f.uid, f.dir).toBe(postgresUid());
      expect(f.mode & 0o077, `${f.dir} is open to other users`).toBe(0);
    }
    expect(fs.readFileSync(path.join(outsideDir, 'clone.txt'), 'utf8').split('\n')[0]).toBe(fs.realpathSync(stateDir));

    // A second start (stopped or running) reuses the cluster and its data.
    cluster.stop();
    const secondLog: string[] = [];
    const again = await start(stateDir, secondLog);
    expect(again.dataDir).toBe(cluster.dataDir);
    expect(secondLog.some((l) => l.startsWith('Initialising'))).toBe(false);
    expect((await query(again, `select to_regclass('survives_restart') is not null as kept`)).rows).toEqual([{ kept: true }]);

    // The clean-up command's core removes the data and the per-clone folder outside the repo.
    expect(destroyCluster({ name: 'pg', stateDir })).toBe(cluster.dataDir);
    expect(fs.existsSync(cluster.dataDir)).toBe(false);
    expect(fs.existsSync(outsideDir)).toBe(false);
    expect(destroyCluster({ name: 'pg', stateDir })).toBeNull();
  });

  it('replaces the clusters an earlier clone at the same path left outside it (a CI checkout made again)', async () => {
    const stateDir = path.join(privateFolder(), 'checkout', '.data');
    const first = await startCluster({ name: 'pg', port: await freePort(), fsync: false, stateDir, password: 'first-clone' });
    await query(first, 'create table from_the_first_clone (id int)');
    first.stop();
    const outsideDir = path.dirname(first.dataDir);

    // The checkout is deleted and made again at the same path with a new password: its
    // folder outside still holds the first clone's cluster, whose password is gone.
    fs.rmSync(path.dirname(stateDir), { recursive: true, force: true });
    const log: string[] = [];
    const second = await start(stateDir, log);
    started.push({ stateDir, cluster: second });
    expect(second.dataDir).toBe(first.dataDir);
    expect(log.some((l) => l.startsWith(`Removing ${outsideDir}`))).toBe(true);
    expect((await query(second, `select to_regclass('from_the_first_clone') is null as fresh`)).rows).toEqual([{ fresh: true }]);

    // The same clone starting again keeps its cluster.
    second.stop();
    const again: string[] = [];
    await start(stateDir, again);
    expect(again.some((l) => l.startsWith('Removing') || l.startsWith('Initialising'))).toBe(false);
  });

  it('keeps two clones side by side on different ports apart', async () => {
    const parent = privateFolder();
    const a = await start(path.join(parent, 'clone-a', '.data'));
    const b = await start(path.join(parent, 'clone-b', '.data'));
    expect(a.port).not.toBe(b.port);
    expect(a.dataDir).not.toBe(b.dataDir);
    expect(path.dirname(a.dataDir)).not.toBe(path.dirname(b.dataDir));
    await query(a, 'create table only_in_a (id int)');
    expect((await query(a, `select to_regclass('only_in_a') is not null as here`)).rows).toEqual([{ here: true }]);
    expect((await query(b, `select to_regclass('only_in_a') is not null as here`)).rows).toEqual([{ here: false }]);
  });

  it('keeps the cluster inside a clone that the postgres user can enter', async () => {
    const parent = privateFolder();
    fs.chmodSync(parent, 0o755);
    const stateDir = path.join(parent, 'clone', '.data');
    openFolders(stateDir);
    const cluster = await start(stateDir);
    expect(cluster.dataDir).toBe(path.join(stateDir, 'pg'));
    expect(fs.statSync(cluster.dataDir).uid).toBe(postgresUid());
    expect((await query(cluster, 'select 2 as two')).rows).toEqual([{ two: 2 }]);
  });

  it('names the folder and the reason when the postgres user cannot use it', async () => {
    const locked = privateFolder();
    const inside = path.join(locked, 'clone');
    fs.mkdirSync(inside);
    expect(serverAccessProblem(inside)).toBe(`the postgres user cannot pass through ${locked} (owner root, mode 0700: other users may not enter it)`);

    // A data directory copied in by root (owner root, 0700) is refused before pg_ctl runs.
    fs.chmodSync(locked, 0o755);
    const stateDir = path.join(inside, '.data');
    openFolders(stateDir);
    fs.mkdirSync(path.join(stateDir, 'pg'), { mode: 0o700 });
    fs.writeFileSync(path.join(stateDir, 'pg', 'PG_VERSION'), '15\n');
    await expect(startCluster({ name: 'pg', port: await freePort(), fsync: false, stateDir, password: PASSWORD })).rejects.toThrow(
      `PostgreSQL runs as the postgres user, and the postgres user cannot read and write ${path.join(stateDir, 'pg')} (owner root, mode 0700; it must be owned by postgres). Run \`npm run db -- destroy\``,
    );
  });
});
