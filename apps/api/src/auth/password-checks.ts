import { verifyPassword } from '@earmark/db';
import { createComputePool, type ComputePool } from '@earmark/platform';

/** Compares a password with its bcrypt hash. */
export interface PasswordChecks {
  verify(password: string, hash: string): Promise<boolean>;
  close(): Promise<void>;
}

const PASSWORD_THREAD_MODULE = new URL(`./password.thread.${import.meta.url.endsWith('.ts') ? 'ts' : 'js'}`, import.meta.url);

/**
 * Password checks on their own worker threads, one per slot of the sign-in work gate
 * (work-gate.ts bounds how many run and wait, so the pool's queue never fills).
 */
export function threadedPasswordChecks(concurrency: number, queue: number): PasswordChecks {
  const pool: ComputePool = createComputePool({ module: PASSWORD_THREAD_MODULE, threads: concurrency, minThreads: 1, maxQueue: concurrency + queue, memoryMbPerThread: 64 });
  return {
    verify: (password, hash) => pool.run<boolean>('verify', { password, hash }),
    close: () => pool.destroy(),
  };
}

/** On the calling thread (scripts and tests that build a SessionService by hand). */
export const inlinePasswordChecks: PasswordChecks = { verify: verifyPassword, close: async () => {} };
