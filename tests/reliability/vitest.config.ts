import { defineProject } from 'vitest/config';

// The reliability suite (docs/reliability.md). Inside `npm test` it runs quick (small sizes, no
// figure targets); `npm run test:reliability` sets EARMARK_RELIABILITY_MODE=full. Files run one
// after another: each brings up a whole stack of processes, and the load figures must not share
// the machine's two cores with another file.
export default defineProject({
  test: {
    name: 'reliability',
    include: ['**/*.test.ts'],
    fileParallelism: false,
    testTimeout: 120_000,
    hookTimeout: 120_000,
  },
});
