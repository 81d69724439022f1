import PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { createQueues } from './queues.js';

/** Starts pg-boss on the application database (schema `pgboss`) with its queues created. */
export async function startBoss(url: string, logger: Logger): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString: url, schema: 'pgboss', max: 4 });
  // Without a listener a database blip would crash the process.
  boss.on('error', (error) => logger.error({ err: error }, 'pg-boss error'));
  await boss.start();
  await createQueues(boss);
  return boss;
}
