import { defineProject } from 'vitest/config';

export default defineProject({
  test: {
    name: 'tests',
    include: ['integration/**/*.test.ts', 'e2e/**/*.test.ts'],
    testTimeout: 60000,
    hookTimeout: 120000,
  },
});
