import { execFile } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import pg from 'pg';

declare module 'vitest' {
  export interface ProvidedContext {
    /** This run's id (tests/setup/postgres.global.ts): its demo snapshots carry it and die with it. */
    demoSnapshotRun: string;
  }
}

/**
 * A seeded demo history kept for the rest of one vitest run, so that only the first file
 * needing it pays for the seeding: a template database (nobody connects to it, so every
 * clone is a plain CREATE DATABASE … TEMPLATE), a copy of the S3 fake's folder and a JSON
 * file with what the database cannot tell (the CI token in clear, the seeding's figures).
 */
export interface SnapshotPlace {
  adminUrl: string;
  database: string;
  dir: string;
}

const PREFIX = 'earmark_demo_snapshot_';
/** First key of the two-key advisory locks; the template lock uses the one-key form. */
const LOCK_CLASS = 720_302;
const run = promisify(execFile);
const quote = (name: string) => `"${name.replace(/"/g, '""')}"`;

const snapshotDir = (runId: string) => path.join(os.tmpdir(), `earmark-demo-snapshot-${runId}`);

/**
 * Where the run's snapshot lives. Scoped to the run, not to a code version: a run tests one
 * version, and a watch-mode rerun drops the snapshot first (tests/setup/postgres.global.ts).
 */
export function snapshotPlace(adminUrl: string, runId: string): SnapshotPlace {
  return { adminUrl, database: `${PREFIX}${runId}`, dir: snapshotDir(runId) };
}

function urlOf(adminUrl: string, database: string): string {
  const url = new URL(adminUrl);
  url.pathname = `/${database}`;
  return url.toString();
}

async function withAdmin<T>(adminUrl: string, fn: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    return await fn(client);
  } finally {
    await client.end();
  }
}

/**
 * Runs `fn` holding the snapshot's lock, so that of two files (or two vitest processes of one
 * run) wanting the snapshot at once, one seeds and saves it while the other waits to clone it.
 */
export function withSnapshotLock<T>(place: SnapshotPlace, fn: () => Promise<T>): Promise<T> {
  // The lock is the session's: closing the connection releases it, whatever `fn` did.
  return withAdmin(place.adminUrl, async (client) => {
    await client.query('select pg_advisory_lock($1, hashtext($2))', [LOCK_CLASS, place.database]);
    return fn();
  });
}

/** The saved JSON when the snapshot is complete (its database is renamed into place last), else null. */
export async function readSnapshot<T>(place: SnapshotPlace): Promise<T | null> {
  const exists = await withAdmin(place.adminUrl, (c) => c.query('select 1 from pg_database where datname = $1', [place.database]));
  const metaFile = path.join(place.dir, 'meta.json');
  return exists.rowCount && fs.existsSync(metaFile) ? (JSON.parse(fs.readFileSync(metaFile, 'utf8')) as T) : null;
}

/**
 * Saves a running stack's database and objects as the snapshot. The stack stays up: pg_dump
 * reads one consistent view while it runs, whereas CREATE DATABASE … TEMPLATE would need
 * every connection to the seeded database closed (its API pool and worker included).
 */
export async function saveSnapshot(place: SnapshotPlace, source: { databaseUrl: string; objectsDir: string }, meta: unknown): Promise<void> {
  fs.rmSync(place.dir, { recursive: true, force: true });
  fs.mkdirSync(place.dir, { recursive: true, mode: 0o700 });
  fs.cpSync(source.objectsDir, path.join(place.dir, 'objects'), { recursive: true });
  const building = `${place.database}_building`;
  const dump = path.join(place.dir, 'database.dump');
  await withAdmin(place.adminUrl, async (c) => {
    await c.query(`drop database if exists ${quote(building)} with (force)`);
    await c.query(`create database ${quote(building)} template template0`);
  });
  await run('/usr/bin/pg_dump', ['--format=custom', `--file=${dump}`, `--dbname=${source.databaseUrl}`]);
  await run('/usr/bin/pg_restore', ['--exit-on-error', '--no-owner', `--dbname=${urlOf(place.adminUrl, building)}`, dump]);
  fs.rmSync(dump);
  fs.writeFileSync(path.join(place.dir, 'meta.json'), JSON.stringify(meta), { mode: 0o600 });
  // Renamed only when complete: readSnapshot never sees half a snapshot.
  await withAdmin(place.adminUrl, (c) => c.query(`alter database ${quote(building)} rename to ${quote(place.database)}`));
}

/** The run's snapshot (a half-built one too) and its folder, gone: the global teardown calls it. */
export async function dropSnapshots(adminUrl: string, runId: string): Promise<void> {
  const like = `${PREFIX}${runId}`.replace(/_/g, '\\_') + '%';
  await withAdmin(adminUrl, async (c) => {
    const { rows } = await c.query<{ datname: string }>('select datname from pg_database where datname like $1', [like]);
    for (const { datname } of rows) await c.query(`drop database if exists ${quote(datname)} with (force)`);
  });
  fs.rmSync(snapshotDir(runId), { recursive: true, force: true });
}
