import { defineProject } from 'vitest/config';

export default defineProject({
  // Generous timeout: the package suites run two files at a time on a 2-core machine.
  test: { name: 'dsp', include: ['test/**/*.test.ts'], testTimeout: 30000 },
});
