import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const workerDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../apps/worker');

export interface WorkerProcess {
  child: ChildProcess;
  output: string[];
  /** SIGKILL: no clean-up, no graceful stop — what a crash or OOM kill looks like. */
  kill(): Promise<void>;
  stop(): Promise<void>;
}

/** The real worker as its own process (node + tsx), resolved once it logs "worker ready". */
export async function startWorkerProcess(env: Record<string, string>): Promise<WorkerProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'src/worker.ts'], {
    cwd: workerDir,
    env: { ...process.env, EARMARK_LOG_LEVEL: 'info', AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const output: string[] = [];
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  await new Promise<void>((resolve, reject) => {
    // Generous: tsx compiles the worker and each analysis thread on start, which takes over 30 s on 2 busy cores.
    const timer = setTimeout(() => reject(new Error(`worker did not start within 90 s:\n${output.join('')}`)), 90_000);
    const onData = (chunk: Buffer) => {
      output.push(chunk.toString());
      if (chunk.toString().includes('worker ready')) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout.on('data', onData);
    child.stderr.on('data', (c: Buffer) => output.push(c.toString()));
    child.once('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`worker exited with ${code}:\n${output.join('')}`));
    });
  });
  return {
    child,
    output,
    async kill() {
      child.kill('SIGKILL');
      await exited;
    },
    async stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
      await exited;
    },
  };
}
