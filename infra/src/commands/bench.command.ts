import fs from 'node:fs';
import path from 'node:path';
import { repoRoot } from '../paths.js';
import { runInherited } from '../shell.js';

/** `npm run bench`: the engine benchmark (speed and memory against reference libraries). */
export async function benchCommand(args: string[]): Promise<number> {
  const script = path.join(repoRoot, 'packages', 'dsp', 'bench', 'run.ts');
  if (!fs.existsSync(script)) {
    console.error('earmark: no benchmark script at packages/dsp/bench/run.ts');
    return 2;
  }
  return runInherited(process.execPath, ['--import', 'tsx', script, ...args], { cwd: path.join(repoRoot, 'packages', 'dsp') });
}
