import { defineProject } from 'vitest/config';

export default defineProject({
  test: {
    name: 'tests',
    // After the package suites, one file at a time (see the root vitest.config.ts).
    sequence: { groupOrder: 1 },
    maxWorkers: 1,
    include: ['integration/**/*.test.ts', 'e2e/**/*.test.ts'],
    testTimeout: 60000,
    hookTimeout: 120000,
  },
});
