import { defineProject } from 'vitest/config';

export default defineProject({
  // Each command test starts node + tsx; with two files at a time on 2 cores that can take seconds.
  test: { name: 'cli', include: ['test/**/*.test.ts'], testTimeout: 30000 },
});
