import { spawn, type ChildProcess, type SpawnOptions } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Host } from './hosts.js';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

/** The production entry points, as `npm run serve:api|serve:worker|admin` start them (built JavaScript, no tsx). */
export const BUILT_ENTRY = {
  api: 'apps/api/build/server.js',
  worker: 'apps/worker/build/worker.js',
  admin: 'apps/api/build/admin.js',
  cli: 'apps/cli/build/main.js',
} as const;

export interface BuiltProcess {
  name: string;
  child: ChildProcess;
  /** Everything it wrote, stdout and stderr interleaved. */
  output(): string;
  /** Log lines it wrote as JSON (pino), parsed. */
  logLines(): Array<Record<string, unknown>>;
  exited: Promise<number | null>;
  /** SIGKILL: what a crash or an OOM kill looks like. */
  kill(): Promise<void>;
  /** SIGTERM and wait for the exit. */
  stop(): Promise<number | null>;
}

/**
 * Starts one production process from the build: `node --conditions=earmark-built <entry>` with
 * exactly the environment given (plus PATH and HOME), so nothing leaks in from the test runner
 * (no NODE_OPTIONS, no tsx loader). Resolves when `readyLine` appears in its output. With a
 * `host` it runs inside that simulated host's network namespace; the child is still node itself.
 */
export async function startBuiltProcess(opts: { name: string; entry: keyof typeof BUILT_ENTRY; env: Record<string, string>; args?: string[]; readyLine?: string; timeoutMs?: number; host?: Host }): Promise<BuiltProcess> {
  const argv = [process.execPath, '--conditions=earmark-built', '--enable-source-maps', BUILT_ENTRY[opts.entry], ...(opts.args ?? [])];
  const spawnOptions: SpawnOptions = {
    cwd: repoRoot,
    env: { PATH: process.env.PATH ?? '/usr/bin:/bin', HOME: process.env.HOME ?? '/root', ...opts.env },
    stdio: ['pipe', 'pipe', 'pipe'],
  };
  const child = opts.host ? opts.host.exec(argv, spawnOptions) : spawn(argv[0]!, argv.slice(1), spawnOptions);
  let text = '';
  // Decoded per stream, so a character split between two chunks (the CLI's − sign) stays whole.
  child.stdout!.setEncoding('utf8').on('data', (c: string) => (text += c));
  child.stderr!.setEncoding('utf8').on('data', (c: string) => (text += c));
  // 'close', not 'exit': only then has everything the process wrote been read.
  const exited = new Promise<number | null>((resolve) => child.once('close', (code) => resolve(code)));
  if (opts.readyLine) {
    const readyLine = opts.readyLine;
    await new Promise<void>((resolve, reject) => {
      const timer = setTimeout(() => {
        child.kill('SIGKILL'); // nobody holds a handle to stop it otherwise
        reject(new Error(`${opts.name} did not become ready within ${opts.timeoutMs ?? 30_000} ms:\n${text}`));
      }, opts.timeoutMs ?? 30_000);
      const check = () => {
        if (text.includes(readyLine)) {
          clearTimeout(timer);
          resolve();
        }
      };
      child.stdout!.on('data', check);
      child.stderr!.on('data', check);
      void exited.then((code) => {
        clearTimeout(timer);
        reject(new Error(`${opts.name} exited with ${code} before it was ready:\n${text}`));
      });
    });
  }
  return {
    name: opts.name,
    child,
    output: () => text,
    logLines: () =>
      text
        .split('\n')
        .filter((l) => l.startsWith('{'))
        .flatMap((l) => {
          try {
            return [JSON.parse(l) as Record<string, unknown>];
          } catch {
            return [];
          }
        }),
    exited,
    async kill() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
      await exited;
    },
    async stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
      return exited;
    },
  };
}

/** Runs a built one-off command (admin, CLI) to its end; resolves with its exit code and output. */
export async function runBuilt(entry: keyof typeof BUILT_ENTRY, args: string[], env: Record<string, string>, stdin?: string): Promise<{ code: number | null; output: string }> {
  const proc = await startBuiltProcess({ name: entry, entry, env, args });
  if (stdin !== undefined) proc.child.stdin!.end(stdin);
  else proc.child.stdin!.end();
  const code = await proc.exited;
  return { code, output: proc.output() };
}
