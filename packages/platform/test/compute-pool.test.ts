import { afterAll, describe, expect, it } from 'vitest';
import { ComputePoolBusyError, ComputeTaskError, ComputeThreadError, createComputePool } from '../src/compute/index.js';

const pool = createComputePool({ module: new URL('./fixtures/tasks.thread.ts', import.meta.url), threads: 2, maxQueue: 2, memoryMbPerThread: 64 });
afterAll(() => pool.destroy());

describe('the compute pool', () => {
  it('runs a task in a thread and returns its value', async () => {
    await expect(pool.run('sum', { values: Float64Array.from([1, 2, 3.5]) })).resolves.toBe(6.5);
  });

  it("hands back a task's error with its name and fields, so the caller can map it", async () => {
    const error = await pool.run('fail', { limit: 64 }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ComputeTaskError);
    expect(error).toMatchObject({ taskErrorName: 'LimitError', message: 'over the limit of 64', props: { code: 'too-many', limit: 64 } });
  });

  it('keeps the event loop free while the threads work', async () => {
    const started = Date.now();
    const work = Promise.all([pool.run('spin', { ms: 400 }), pool.run('spin', { ms: 400 })]);
    // A timer on this thread fires on time although 800 ms of CPU run meanwhile.
    const lag = await new Promise<number>((resolve) => setTimeout(() => resolve(Date.now() - started - 50), 50));
    expect(lag).toBeLessThan(100);
    await work;
  });

  it('refuses at once when every thread is busy and the queue is full', async () => {
    const tasks = [1, 2, 3, 4].map(() => pool.run('spin', { ms: 300 }));
    await expect(pool.run('spin', { ms: 1 })).rejects.toBeInstanceOf(ComputePoolBusyError);
    await Promise.all(tasks);
  });

  it('loses only the thread of a task that outgrows its memory budget', async () => {
    await expect(pool.run('hog', {})).rejects.toBeInstanceOf(ComputeThreadError);
    await expect(pool.run('sum', { values: Float64Array.from([2]) })).resolves.toBe(2);
  });
});
