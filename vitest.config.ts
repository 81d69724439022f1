import { defineConfig } from 'vitest/config';

// One project per package/app (each has a defineProject config). The global setup
// starts the private test PostgreSQL once per run and migrates a template database.
export default defineConfig({
  test: {
    projects: ['packages/*', 'apps/*', 'tests', 'tests/reliability'],
    globalSetup: ['./tests/setup/postgres.global.ts'],
  },
});
