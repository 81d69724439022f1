import path from 'node:path';
import { buildServerPackages } from '../build-js.js';
import { ensureChromium } from '../chromium.js';
import { ensurePostgresInstalled } from '../postgres.js';
import { repoRoot } from '../paths.js';
import { runInherited } from '../shell.js';
import { cleanUpTestCluster } from '../test-cluster.js';
import { ensureWebBuilt } from '../web-build.js';

const log = (line: string) => console.log(`earmark: ${line}`);
const bin = (pkg: string, file: string) => path.join(repoRoot, 'node_modules', pkg, file);

/**
 * `npm test`: type check, lint, then every vitest project (unit, API integration
 * against a private PostgreSQL, browser end-to-end). Extra arguments go to vitest,
 * e.g. `npm test -- --project dsp`. The runner's summary is the closing output.
 */
export async function testCommand(args: string[]): Promise<number> {
  ensurePostgresInstalled(log);
  ensureChromium(log);
  ensureWebBuilt(log);

  log('type check (tsc -b)…');
  if ((await runInherited(process.execPath, [bin('typescript', 'bin/tsc'), '-b'], { cwd: repoRoot })) !== 0) return 1;
  log('lint (eslint)…');
  if ((await runInherited(process.execPath, [bin('eslint', 'bin/eslint.js'), '.'], { cwd: repoRoot })) !== 0) return 1;
  // The production tests run the built JavaScript, exactly what `npm run build` makes.
  log('build (esbuild: the production processes)…');
  await buildServerPackages(log);
  log('tests (vitest)…');
  try {
    return await runInherited(process.execPath, [bin('vitest', 'vitest.mjs'), 'run', ...args], { cwd: repoRoot });
  } finally {
    await cleanUpTestCluster();
  }
}
