import { defineProject } from 'vitest/config';

export default defineProject({
  test: { name: 'api', include: ['test/**/*.test.ts'], testTimeout: 20000, hookTimeout: 30000 },
});
