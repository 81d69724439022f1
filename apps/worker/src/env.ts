import { z } from 'zod';

const Env = z.object({
  EARMARK_DATABASE_URL: z.string().startsWith('postgres'),
  EARMARK_WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(16).default(2),
  EARMARK_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
});
export type WorkerEnv = z.infer<typeof Env>;

/** The only place the worker reads process.env. */
export function loadWorkerEnv(env: NodeJS.ProcessEnv = process.env): WorkerEnv {
  const parsed = Env.safeParse(env);
  if (!parsed.success) {
    throw new Error(`Invalid worker environment: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  return parsed.data;
}
