import { spawn, spawnSync, type SpawnOptions } from 'node:child_process';

export class CommandError extends Error {}

/** Runs a command to completion, inheriting or capturing output; throws on non-zero exit. */
export function run(cmd: string, args: string[], opts: SpawnOptions & { quiet?: boolean } = {}): string {
  const res = spawnSync(cmd, args, { encoding: 'utf8', stdio: opts.quiet === false ? 'inherit' : 'pipe', ...opts });
  if (res.error) throw new CommandError(`${cmd} could not start: ${res.error.message}`);
  if (res.status !== 0) {
    const out = `${res.stdout ?? ''}${res.stderr ?? ''}`.trim();
    throw new CommandError(`${cmd} ${args.join(' ')} exited with ${res.status}${out ? `:\n${out}` : ''}`);
  }
  return String(res.stdout ?? '');
}

/** Runs a command with inherited output and resolves with its exit code. */
export function runInherited(cmd: string, args: string[], opts: SpawnOptions = {}): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, { stdio: 'inherit', ...opts });
    child.on('error', reject);
    child.on('exit', (code, signal) => resolve(code ?? (signal ? 1 : 0)));
  });
}

export const isRoot = (): boolean => typeof process.getuid === 'function' && process.getuid() === 0;
