import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { isRoot, run } from './shell.js';

/**
 * Where a private PostgreSQL cluster lives, and making sure the server user can use it.
 *
 * As root, initdb and postgres run as the `postgres` system user, which must be able to
 * reach the data directory. A clone inside /root, inside a `mktemp -d` folder or any other
 * 0700 folder is not reachable by other users, so its clusters live outside the clone in
 *   <outside root>/<key>/<name>
 * where the outside root (default /var/lib/earmark) is root-owned with mode 0711 (other
 * users may pass through but not list it) and <key> names one clone's state folder: it is
 * owned by `postgres`, mode 0700, and holds that clone's clusters only.
 */

export const SERVER_USER = 'postgres';
export const DEFAULT_OUTSIDE_ROOT = '/var/lib/earmark';
const OWNER_NOTE = 'clone.txt';

export interface ClusterPlace {
  /** The cluster's data directory. */
  dir: string;
  /** The per-clone folder outside the repository, or null when the cluster lives in it. */
  outsideDir: string | null;
}

export interface PlaceOptions {
  /** The clone's private state folder (`.data`). */
  stateDir: string;
  /** Cluster folder name (`pg`, `pg-test`). */
  name: string;
  /** Root of the folders made outside clones; tests point it elsewhere. */
  outsideRoot?: string;
  /**
   * Names the clone's clusters (a digest of their password). A folder outside the clone
   * whose note names another owner was left by an earlier clone at the same path (a CI
   * checkout, a deleted and re-cloned folder): its password is lost, so it is stale.
   */
  owner?: string;
}

/** Runs `test <args>` as the server user; true when it succeeds. Always true when not root. */
function serverUserTest(args: string[]): boolean {
  if (!isRoot()) return true;
  try {
    run('runuser', ['-u', SERVER_USER, '--', 'test', ...args], { cwd: '/' });
    return true;
  } catch {
    return false;
  }
}

const modeOf = (st: fs.Stats) => `0${(st.mode & 0o777).toString(8)}`;

function ownerName(uid: number): string {
  try {
    const line = fs.readFileSync('/etc/passwd', 'utf8').split('\n').find((l) => l.split(':')[2] === String(uid));
    return line ? line.split(':')[0]! : `uid ${uid}`;
  } catch {
    return `uid ${uid}`;
  }
}

/** Why the server user cannot pass through `dir` and every folder above it, or null when it can. */
export function serverTraverseProblem(dir: string): string | null {
  if (!isRoot()) return null;
  const chain: string[] = [];
  for (let p = path.resolve(dir); ; p = path.dirname(p)) {
    chain.unshift(p);
    if (p === path.dirname(p)) break;
  }
  for (const folder of chain) {
    if (!fs.existsSync(folder)) break;
    if (!serverUserTest(['-x', folder])) {
      const st = fs.statSync(folder);
      return `the ${SERVER_USER} user cannot pass through ${folder} (owner ${ownerName(st.uid)}, mode ${modeOf(st)}: other users may not enter it)`;
    }
  }
  return null;
}

/**
 * Why the server user cannot use `dir` (pass through every folder above it, then read,
 * write and enter it), in words naming the folder at fault, or null when it can.
 */
export function serverAccessProblem(dir: string): string | null {
  if (!isRoot()) return null;
  const above = serverTraverseProblem(path.dirname(path.resolve(dir)));
  if (above) return above;
  if (!fs.existsSync(dir)) return null;
  if (!serverUserTest(['-r', dir, '-a', '-w', dir, '-a', '-x', dir])) {
    const st = fs.statSync(dir);
    return `the ${SERVER_USER} user cannot read and write ${dir} (owner ${ownerName(st.uid)}, mode ${modeOf(st)}; it must be owned by ${SERVER_USER})`;
  }
  return null;
}

/** Throws an error that names the folder and the reason when the server user cannot use it. */
export function assertServerCanUse(dir: string, remedy: string): void {
  const problem = serverAccessProblem(dir);
  if (problem) throw new Error(`PostgreSQL runs as the ${SERVER_USER} user, and ${problem}. ${remedy}`);
}

/** The per-clone folder name outside the repository: a hash of the state folder's real path. */
export function outsideKey(stateDir: string): string {
  const real = fs.existsSync(stateDir) ? fs.realpathSync(stateDir) : path.resolve(stateDir);
  return createHash('sha256').update(real).digest('hex').slice(0, 16);
}

function chown(target: string, recursive = false): void {
  if (isRoot()) run('chown', [...(recursive ? ['-R'] : []), `${SERVER_USER}:${SERVER_USER}`, target]);
}

/** Creates the outside root (root-owned, 0711) and refuses one that other users can write. */
function prepareOutsideRoot(outsideRoot: string): void {
  fs.mkdirSync(outsideRoot, { recursive: true, mode: 0o711 });
  const st = fs.statSync(outsideRoot);
  if (st.uid !== 0) throw new Error(`${outsideRoot} must be owned by root (it is owned by ${ownerName(st.uid)}); remove it and run again.`);
  if ((st.mode & 0o777) !== 0o711) fs.chmodSync(outsideRoot, 0o711);
}

/** Where the cluster's data directory is, without creating anything (null when it exists nowhere). */
export function findClusterPlace(opts: PlaceOptions): ClusterPlace | null {
  const inside = path.join(opts.stateDir, opts.name);
  if (fs.existsSync(inside)) return { dir: inside, outsideDir: null };
  const outsideDir = path.join(opts.outsideRoot ?? DEFAULT_OUTSIDE_ROOT, outsideKey(opts.stateDir));
  const dir = path.join(outsideDir, opts.name);
  return fs.existsSync(dir) ? { dir, outsideDir } : null;
}

/**
 * Decides where the cluster lives and prepares the folders on the way so that the server
 * user can reach exactly what it needs: inside the clone when the server user can pass
 * through the state folder, else outside it (see the module comment).
 */
export function prepareClusterPlace(opts: PlaceOptions): ClusterPlace {
  fs.mkdirSync(opts.stateDir, { recursive: true });
  const existing = findClusterPlace(opts);
  if (existing) return existing;
  return createClusterPlace(opts);
}

/** The outside folder of this clone's path when it belongs to an earlier clone at that path, else null. */
export function staleOutsideFolder(opts: PlaceOptions & { secretsFile: string }): string | null {
  const outsideDir = path.join(opts.outsideRoot ?? DEFAULT_OUTSIDE_ROOT, outsideKey(opts.stateDir));
  const note = path.join(outsideDir, OWNER_NOTE);
  if (!fs.existsSync(note) || !opts.owner) return null;
  const recorded = fs.readFileSync(note, 'utf8').split('\n')[1]?.replace(/^owner /, '').trim();
  if (recorded) return recorded === opts.owner ? null : outsideDir;
  // A note from before owners were recorded: stale when the clone's secrets are younger than it.
  const secretsBorn = fs.existsSync(opts.secretsFile) ? fs.statSync(opts.secretsFile).mtimeMs : Date.now();
  return secretsBorn > fs.statSync(note).mtimeMs ? outsideDir : null;
}

function createClusterPlace(opts: PlaceOptions): ClusterPlace {
  if (serverTraverseProblem(opts.stateDir) === null) return { dir: path.join(opts.stateDir, opts.name), outsideDir: null };

  const outsideRoot = opts.outsideRoot ?? DEFAULT_OUTSIDE_ROOT;
  prepareOutsideRoot(outsideRoot);
  const outsideDir = path.join(outsideRoot, outsideKey(opts.stateDir));
  fs.mkdirSync(outsideDir, { recursive: true, mode: 0o700 });
  fs.chmodSync(outsideDir, 0o700);
  // Says which clone the folder belongs to, for whoever finds it later.
  const owner = opts.owner ? `owner ${opts.owner}\n` : '';
  fs.writeFileSync(path.join(outsideDir, OWNER_NOTE), `${fs.realpathSync(opts.stateDir)}\n${owner}`, { mode: 0o644 });
  chown(outsideDir, true);
  return { dir: path.join(outsideDir, opts.name), outsideDir };
}

/** Creates the (empty) data directory owned by the server user with mode 0700. */
export function prepareDataDir(dir: string): void {
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  fs.chmodSync(dir, 0o700);
  chown(dir, true);
}

/**
 * Removes the cluster's folders: the data directory, and the per-clone folder outside the
 * repository once it holds no other cluster (and the outside root once it is empty).
 */
export function removeClusterPlace(place: ClusterPlace): void {
  fs.rmSync(place.dir, { recursive: true, force: true });
  if (!place.outsideDir) return;
  const left = fs.existsSync(place.outsideDir) ? fs.readdirSync(place.outsideDir).filter((f) => f !== OWNER_NOTE) : [];
  if (left.length > 0) return;
  fs.rmSync(place.outsideDir, { recursive: true, force: true });
  const outsideRoot = path.dirname(place.outsideDir);
  if (fs.existsSync(outsideRoot) && fs.readdirSync(outsideRoot).length === 0) fs.rmdirSync(outsideRoot);
}
