import os from 'node:os';
import { defineConfig } from 'vitest/config';

// One project per package/app (each has a defineProject config). The global setup
// starts the private test PostgreSQL once per run and migrates a template database.
//
// Two groups run one after the other. First the package and app suites, two files at a
// time or more (each file has its own database, and most of their time is spent waiting
// on PostgreSQL or a child process, so a second file fills the gaps). Then the
// whole-stack suites (`tests`: integration and browser end-to-end), one file at a time:
// each brings up processes and a browser, and some time their drains and retries. The
// reliability suite runs last on its own (fileParallelism: false).
const packageWorkers = Math.min(4, Math.max(2, os.availableParallelism()));

export default defineConfig({
  test: {
    projects: ['packages/*', 'apps/*', 'tests', 'tests/reliability'],
    globalSetup: ['./tests/setup/postgres.global.ts'],
    maxWorkers: packageWorkers,
  },
});
