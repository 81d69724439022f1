import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import type { Transferable } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { SerializedTaskError } from './compute-task.js';

export interface ComputePoolOptions {
  /** The thread module (a file URL): it exports its tasks through `defineComputeTasks`. */
  module: URL;
  /** Threads kept busy at most: the CPU this pool may use. */
  threads: number;
  /** Tasks allowed to wait for a thread; past it `run` refuses at once (ComputePoolBusyError). */
  maxQueue: number;
  /** V8 old-generation limit per thread: one task that outgrows it kills only its thread. */
  memoryMbPerThread: number;
  /** Threads started at once and kept while idle (default 1): a pool whose every thread is always wanted. */
  minThreads?: number;
}

/** The pool's queue is full: the caller should answer "busy, retry" rather than wait. */
export class ComputePoolBusyError extends Error {
  override readonly name = 'ComputePoolBusyError';
}

/** A task failed in its thread; `taskErrorName` and `props` say what it threw there. */
export class ComputeTaskError extends Error {
  override readonly name = 'ComputeTaskError';
  constructor(
    message: string,
    readonly taskErrorName: string,
    readonly props: Record<string, unknown>,
  ) {
    super(message);
  }
}

/** A thread that died (out of memory, crash) rather than a task that threw. */
export class ComputeThreadError extends Error {
  override readonly name = 'ComputeThreadError';
  constructor(
    message: string,
    /** The thread outgrew `memoryMbPerThread` (rather than crashing or being stopped). */
    readonly outOfMemory = false,
  ) {
    super(message);
  }
}

export interface ComputePool {
  /** Runs `task` of the thread module with `input` (structured-cloned; `transfer` moves buffers instead). */
  run<T>(task: string, input: unknown, transfer?: Transferable[]): Promise<T>;
  readonly threads: number;
  /** Tasks running and waiting now, for metrics and the readiness answer. */
  load(): { running: number; queued: number };
  destroy(): Promise<void>;
}

/**
 * A bounded pool of worker threads for CPU-heavy work (decoding, FFTs, plot data, stimuli,
 * password hashing), so an event loop that answers requests or polls jobs never runs it.
 * In development the thread module is TypeScript: its threads load it through tsx, as the
 * processes themselves do.
 */
export function createComputePool(options: ComputePoolOptions): ComputePool {
  const module = options.module.href;
  const piscina = new Piscina({
    filename: fileURLToPath(new URL('./compute-thread.mjs', import.meta.url)),
    minThreads: Math.min(options.minThreads ?? 1, options.threads),
    maxThreads: options.threads,
    maxQueue: options.maxQueue,
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: options.memoryMbPerThread },
  });
  let running = 0;
  return {
    threads: options.threads,
    async run<T>(task: string, input: unknown, transfer?: Transferable[]): Promise<T> {
      if (piscina.queueSize >= options.maxQueue) throw new ComputePoolBusyError(`All ${options.threads} compute threads are busy and ${options.maxQueue} tasks wait.`);
      running++;
      try {
        const answer = (await piscina.run({ module, task, input }, transfer ? { transferList: transfer } : {})) as { ok: true; value: T } | { ok: false; error: SerializedTaskError };
        if (answer.ok) return answer.value;
        throw new ComputeTaskError(answer.error.message, answer.error.name, answer.error.props);
      } catch (error) {
        if (error instanceof ComputeTaskError) throw error;
        const message = error instanceof Error ? error.message : String(error);
        if (/queue is at limit/i.test(message)) throw new ComputePoolBusyError(`All ${options.threads} compute threads are busy and ${options.maxQueue} tasks wait.`);
        throw new ComputeThreadError(`A compute thread stopped during "${task}": ${message}`, (error as { code?: unknown }).code === 'ERR_WORKER_OUT_OF_MEMORY');
      } finally {
        running--;
      }
    },
    load: () => ({ running: Math.min(running, piscina.threads.length), queued: piscina.queueSize }),
    destroy: () => piscina.destroy(),
  };
}

/** Threads for a pool when configuration says "auto": every core but the one the event loop needs, at least 1. */
export const defaultComputeThreads = (): number => Math.max(1, availableParallelism() - 1);
