// Runs the real CLI binary (bin/earmark.mjs through tsx) as a pipeline would, with an
// environment the test controls: EARMARK_* from the outer shell never leak in.
import { execFile } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const bin = join(dirname(fileURLToPath(import.meta.url)), '../../bin/earmark.mjs');

export interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

export function earmark(args: string[], options: { cwd: string; env?: Record<string, string> }): Promise<Run> {
  const env: NodeJS.ProcessEnv = { ...process.env };
  delete env['EARMARK_URL'];
  delete env['EARMARK_TOKEN'];
  return new Promise((resolve) => {
    execFile(process.execPath, [bin, ...args], { cwd: options.cwd, env: { ...env, ...options.env } }, (error, stdout, stderr) => {
      const code = error === null ? 0 : typeof error.code === 'number' ? error.code : -1;
      resolve({ code, stdout, stderr });
    });
  });
}
