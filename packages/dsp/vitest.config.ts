import { defineProject } from 'vitest/config';

export default defineProject({
  test: { name: 'dsp', include: ['test/**/*.test.ts'] },
});
