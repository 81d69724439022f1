// Lint for every package, including the dependency direction of shared/CONVENTIONS.md:
// contracts ← dsp (types only); contracts ← platform; contracts ← db; domain takes contracts, dsp, db and
// platform; api/worker take all of those; web/cli take contracts (and dsp), never the server side.
import tseslint from 'typescript-eslint';

const ours = ['@earmark/contracts', '@earmark/dsp', '@earmark/db', '@earmark/platform', '@earmark/domain', '@earmark/api', '@earmark/worker', '@earmark/web', '@earmark/cli'];
const forbid = (allowed, message) => ({
  patterns: [
    { group: ours.filter((p) => !allowed.includes(p)), message },
    { group: ['@earmark/*/src/*', '**/packages/*/src/*', '**/apps/*/src/*'], message: 'Import a package through its exports, not its src/ internals.' },
  ],
});

export default tseslint.config(
  { ignores: ['**/dist/**', '**/build/**', '**/node_modules/**', '.data/**', '**/*.d.ts', 'packages/dsp/reference/**/*.py'] },
  ...tseslint.configs.recommended,
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/consistent-type-imports': 'error',
    },
  },
  {
    files: ['packages/contracts/**/*.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': ['error', forbid([], 'contracts is the bottom layer: it imports no other package of ours.')] },
  },
  {
    files: ['packages/dsp/src/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          paths: [{ name: '@earmark/contracts', message: 'dsp may take only types from contracts (import type).', allowTypeImports: true }],
          patterns: [...forbid([], 'dsp is pure: it imports no package of ours at run time.').patterns, { group: ['node:fs', 'node:fs/*', 'node:net', 'node:http', 'node:child_process', 'fs', 'http', 'child_process'], message: 'dsp does no I/O.' }],
        },
      ],
    },
  },
  {
    files: ['packages/db/**/*.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': ['error', forbid(['@earmark/contracts'], 'db (the entities) imports contracts only.')] },
  },
  {
    files: ['packages/platform/**/*.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': ['error', forbid(['@earmark/contracts'], 'platform (object store, queue, secrets) imports contracts only.')] },
  },
  {
    files: ['packages/domain/**/*.ts'],
    rules: {
      '@typescript-eslint/no-restricted-imports': [
        'error',
        {
          patterns: [
            ...forbid(['@earmark/contracts', '@earmark/dsp', '@earmark/db', '@earmark/platform'], 'domain imports contracts, dsp, db and platform only.').patterns,
            { group: ['express', 'express/*', 'nodemailer', 'pg-boss'], message: 'The domain core knows no transport: HTTP stays in the API, SMTP and the queue behind platform or a port.' },
          ],
        },
      ],
    },
  },
  {
    files: ['apps/api/**/*.ts', 'apps/worker/**/*.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': ['error', forbid(['@earmark/contracts', '@earmark/db', '@earmark/dsp', '@earmark/platform', '@earmark/domain'], 'api and worker import domain, platform, db, contracts and dsp only.')] },
  },
  {
    files: ['apps/web/**/*.{ts,tsx}', 'apps/cli/**/*.ts'],
    rules: { '@typescript-eslint/no-restricted-imports': ['error', forbid(['@earmark/contracts', '@earmark/dsp'], 'web and cli import contracts (and dsp), never db.')] },
  },
  {
    files: ['**/test/**/*.{ts,tsx}', 'tests/**/*.ts'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
);
