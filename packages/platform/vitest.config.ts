import { defineProject } from 'vitest/config';

export default defineProject({
  test: { name: 'platform', include: ['test/**/*.test.ts'] },
});
