import { defineConfig } from 'vitest/config';

// One project per package/app; each has its own vitest.config.ts (defineProject).
export default defineConfig({
  test: {
    projects: ['packages/*', 'apps/*', 'tests'],
  },
});
