import PgBoss from 'pg-boss';
import type { Logger } from 'pino';
import { createQueues, type QueueSettings } from './queues.js';

export interface BossSettings extends QueueSettings {
  /** How often pg-boss expires stuck jobs and runs its housekeeping (≥ 1 s). */
  maintenanceIntervalSeconds?: number;
}

/** Starts pg-boss on the application database (schema `pgboss`) with its queues created. */
export async function startBoss(url: string, logger: Logger, settings: BossSettings = {}): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString: url, schema: 'pgboss', max: 4, maintenanceIntervalSeconds: settings.maintenanceIntervalSeconds ?? 60 });
  // Without a listener a database blip would crash the process.
  boss.on('error', (error) => logger.error({ err: error }, 'pg-boss error'));
  await boss.start();
  await createQueues(boss, settings);
  return boss;
}
