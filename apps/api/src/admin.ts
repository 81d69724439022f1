import { parseArgs } from 'node:util';
import { initOrm, migrate, pendingMigrations } from '@earmark/db';
import { ObjectExportInvalidError, ObjectStore, checkObjectStoreVars, databaseVars, exitOnStartupFailure, exportObjects, importObjects, loadConfig, objectStoreConfigOf, objectStoreVars, type TransferProgress } from '@earmark/platform';
import { z, ZodError } from 'zod';
import { AdminExistsError, createFirstAdmin } from './admin/create-first-admin.js';
import { readSecretInput } from './admin/read-secret-input.js';

// `earmark-admin` (npm run admin -- <command>): the one-off operations of an installation.
const usage = `usage: npm run admin -- <command>
  migrate                    apply the pending database migrations
  migrate --check            exit 1 (and list them) when migrations are pending
  create-admin --email E --name N [--password-file F]
                             create the first administrator; the password is read from
                             the file, or from stdin (never from the command line)
  export-objects DIR [--prefix P]
                             copy every object of the bucket into DIR (resumable; after pg_dump)
  import-objects DIR         restore an export into the bucket (checks every SHA-256; idempotent)`;

const storeConfig = () =>
  loadConfig((mode) => z.object(objectStoreVars(mode)).superRefine(checkObjectStoreVars), process.env, { processName: 'admin', secrets: ['EARMARK_S3_ACCESS_KEY', 'EARMARK_S3_SECRET_KEY'] });

/** One line every 500 objects and at the end, on stderr (stdout carries the summary). */
function progressPrinter(verb: string): (p: TransferProgress) => void {
  return (p) => {
    if (p.objects % 500 === 0) console.error(`${verb} ${p.objects} objects (${(p.bytes / 2 ** 20).toFixed(1)} MiB)…`);
  };
}

const dbConfig = () => loadConfig(() => z.object(databaseVars), process.env, { processName: 'admin', secrets: ['EARMARK_DATABASE_URL'] });

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (command === 'migrate') {
    const { values } = parseArgs({ args: rest, options: { check: { type: 'boolean', default: false } } });
    const orm = await initOrm({ url: dbConfig().EARMARK_DATABASE_URL, poolMax: 2 });
    try {
      if (values.check) {
        const pending = await pendingMigrations(orm);
        console.log(pending.length ? `pending: ${pending.join(', ')}` : 'the database is up to date');
        return pending.length ? 1 : 0;
      }
      const applied = await migrate(orm);
      console.log(applied.length ? `applied ${applied.length} migration(s): ${applied.join(', ')}` : 'the database is up to date; nothing to apply');
      return 0;
    } finally {
      await orm.close();
    }
  }
  if (command === 'create-admin') {
    const { values } = parseArgs({ args: rest, options: { email: { type: 'string' }, name: { type: 'string' }, 'password-file': { type: 'string' } } });
    if (!values.email) throw new UsageError('create-admin needs --email');
    const { EARMARK_DATABASE_URL } = dbConfig();
    const password = await readSecretInput(values['password-file']);
    const orm = await initOrm({ url: EARMARK_DATABASE_URL, poolMax: 2 });
    try {
      const user = await createFirstAdmin(orm, { email: values.email, displayName: values.name ?? values.email.split('@')[0] ?? values.email, password });
      console.log(`created administrator ${user.email}; sign in and add the team's users (docs/operations.md, "First administrator")`);
      return 0;
    } finally {
      await orm.close();
    }
  }
  if (command === 'export-objects' || command === 'import-objects') {
    const { values, positionals } = parseArgs({ args: rest, allowPositionals: true, options: { prefix: { type: 'string' } } });
    const dir = positionals[0];
    if (!dir) throw new UsageError(`${command} needs the folder`);
    const store = new ObjectStore(objectStoreConfigOf(storeConfig()));
    try {
      await store.ping();
      const summary =
        command === 'export-objects'
          ? await exportObjects(store, dir, { ...(values.prefix ? { prefix: values.prefix } : {}), onProgress: progressPrinter('exported') })
          : await importObjects(store, dir, { onProgress: progressPrinter('imported') });
      console.log(`${command === 'export-objects' ? 'exported' : 'imported'} ${summary.objects} objects (${(summary.bytes / 2 ** 20).toFixed(1)} MiB): ${summary.copied} copied, ${summary.skipped} already in place`);
      return 0;
    } finally {
      store.destroy();
    }
  }
  throw new UsageError(command ? `unknown command "${command}"` : 'no command given');
}

class UsageError extends Error {}

try {
  process.exitCode = await main(process.argv.slice(2));
} catch (error) {
  if (error instanceof UsageError) {
    console.error(`earmark-admin: ${error.message}\n${usage}`);
    process.exitCode = 2;
  } else if (error instanceof AdminExistsError || error instanceof ObjectExportInvalidError) {
    console.error(`earmark-admin: ${error.message}`);
    process.exitCode = 1;
  } else if (error instanceof ZodError) {
    console.error(`earmark-admin: ${error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
    process.exitCode = 1;
  } else {
    exitOnStartupFailure('admin', error);
  }
}
