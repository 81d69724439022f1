import { ComputeTaskError, type ComputePool } from '@earmark/platform';
import type { ViewsCompute, ViewsTasks } from './views-tasks.js';

/** The views' tasks on a compute pool built from `VIEWS_THREAD_MODULE`. */
export function poolViewsCompute(pool: Pick<ComputePool, 'run'>, options: { maxPlotSamples?: number } = {}): ViewsCompute {
  return { run: (task, input, transfer) => pool.run(task, input, transfer), ...options };
}

type WrappedTask = (input: unknown) => Promise<{ ok: true; value: unknown } | { ok: false; error: { name: string; message: string; props: Record<string, unknown> } }>;

/**
 * The same tasks on the calling thread, with the pool's error shape: for a process that has no
 * pool for them (the worker runs its analysis in a thread of its own already) and for unit tests.
 */
export function inlineViewsCompute(): ViewsCompute {
  return {
    async run<K extends keyof ViewsTasks>(task: K, input: ViewsTasks[K]['input']): Promise<ViewsTasks[K]['output']> {
      const tasks = (await import('./views.thread.js')) as unknown as Record<string, WrappedTask>;
      const answer = await tasks[task]!(input);
      if (answer.ok) return answer.value as ViewsTasks[K]['output'];
      throw new ComputeTaskError(answer.error.message, answer.error.name, answer.error.props);
    },
  };
}

/** The buffer behind `bytes` when the view owns all of it, so it can be moved to a thread; else none (it is copied). */
export function ownBuffer(bytes: Uint8Array): ArrayBuffer[] {
  const buffer = bytes.buffer;
  return buffer instanceof ArrayBuffer && bytes.byteOffset === 0 && bytes.byteLength === buffer.byteLength ? [buffer] : [];
}
