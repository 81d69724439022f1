import { spawn, type ChildProcess } from 'node:child_process';

export interface Service {
  name: string;
  child: ChildProcess;
}

/**
 * Starts long-running children so that one PID stops each (node itself, not an npx
 * wrapper), prefixes their output, and stops them all together.
 */
export class Supervisor {
  private readonly services: Service[] = [];
  private stopping = false;

  constructor(private readonly onUnexpectedExit: (name: string, code: number | null) => void) {}

  start(name: string, args: string[], opts: { cwd: string; env: NodeJS.ProcessEnv }): Service {
    const child = spawn(process.execPath, args, { cwd: opts.cwd, env: opts.env, stdio: ['ignore', 'pipe', 'pipe'] });
    const prefix = (chunk: Buffer) =>
      chunk
        .toString()
        .split('\n')
        .filter(Boolean)
        .map((line) => `[${name}] ${line}\n`)
        .join('');
    child.stdout?.on('data', (c: Buffer) => process.stdout.write(prefix(c)));
    child.stderr?.on('data', (c: Buffer) => process.stderr.write(prefix(c)));
    child.on('exit', (code) => {
      if (!this.stopping) this.onUnexpectedExit(name, code);
    });
    const service = { name, child };
    this.services.push(service);
    return service;
  }

  /** SIGTERM to every child, then SIGKILL to any still running after the grace period. */
  async stopAll(graceMs = 10_000): Promise<void> {
    this.stopping = true;
    await Promise.all(
      this.services.map(
        ({ child }) =>
          new Promise<void>((resolve) => {
            if (child.exitCode !== null || child.signalCode !== null) return resolve();
            const timer = setTimeout(() => child.kill('SIGKILL'), graceMs);
            child.once('exit', () => {
              clearTimeout(timer);
              resolve();
            });
            child.kill('SIGTERM');
          }),
      ),
    );
  }
}
