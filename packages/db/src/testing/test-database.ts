import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { inject } from 'vitest';

declare module 'vitest' {
  export interface ProvidedContext {
    pgAdminUrl: string;
    pgTemplateDb: string;
  }
}

export interface TestDatabase {
  url: string;
  drop(): Promise<void>;
}

const quote = (name: string) => `"${name.replace(/"/g, '""')}"`;

async function adminQuery(sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: inject('pgAdminUrl') });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

/**
 * A fresh, migrated database for one test file, cloned from the run's template
 * (see tests/setup/postgres.global.ts), so files never share state.
 * @param template another database to clone (one nobody connects to), e.g. a seeded snapshot
 */
export async function createTestDatabase(template = inject('pgTemplateDb')): Promise<TestDatabase> {
  const name = `earmark_t_${randomBytes(6).toString('hex')}`;
  for (let attempt = 0; ; attempt++) {
    try {
      await adminQuery(`create database ${quote(name)} template ${quote(template)}`);
      break;
    } catch (error) {
      // Two files cloning at the same instant: PostgreSQL refuses the second; try again.
      if (attempt > 20 || !/being accessed by other users/.test(String(error))) throw error;
      await new Promise((r) => setTimeout(r, 50 + Math.random() * 100));
    }
  }
  const url = new URL(inject('pgAdminUrl'));
  url.pathname = `/${name}`;
  return { url: url.toString(), drop: () => adminQuery(`drop database if exists ${quote(name)} with (force)`) };
}
