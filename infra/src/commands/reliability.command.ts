import fs from 'node:fs';
import path from 'node:path';
import { ensurePostgresInstalled } from '../postgres.js';
import { repoRoot } from '../paths.js';
import { runInherited } from '../shell.js';

const log = (line: string) => console.log(`earmark: ${line}`);
const bin = (pkg: string, file: string) => path.join(repoRoot, 'node_modules', pkg, file);

/**
 * `npm run test:reliability`: the reliability suite at full size (load, soak, faults, hostile
 * input, security; tests/reliability), then docs/reliability.md from its figures. Sizes come from
 * EARMARK_LOAD_CLIENTS, EARMARK_LOAD_SECONDS, EARMARK_SOAK_CAPTURES, EARMARK_SOAK_BUILDS, …
 * (tests/reliability/support/mode.ts). Extra arguments go to vitest, e.g. `-- faults` for one file;
 * the report then combines that file's figures and outcomes with the latest of every other file.
 * The test cluster keeps running afterwards, as when vitest is run directly.
 */
export async function reliabilityCommand(args: string[]): Promise<number> {
  ensurePostgresInstalled(log);
  const env = { ...process.env, EARMARK_RELIABILITY_MODE: 'full' };
  const results = path.join(repoRoot, '.data', 'reliability', 'full');
  fs.mkdirSync(results, { recursive: true });
  log('reliability suite (vitest, full sizes)…');
  const code = await runInherited(
    process.execPath,
    [bin('vitest', 'vitest.mjs'), 'run', '--project', 'reliability', '--reporter=default', '--reporter=json', `--outputFile.json=${path.join(results, `vitest-${Date.now()}.json`)}`, ...args],
    { cwd: repoRoot, env },
  );
  log('report (docs/reliability.md)…');
  const reported = await runInherited(process.execPath, ['--import', 'tsx', path.join(repoRoot, 'tests/reliability/report.ts')], {
    cwd: path.join(repoRoot, 'tests'),
    env,
  });
  return code !== 0 ? code : reported;
}
