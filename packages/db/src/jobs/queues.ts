import { QUEUES } from '@earmark/contracts';
import type PgBoss from 'pg-boss';

/**
 * Creates every queue with explicit retry, expiry and dead-letter settings. Run at
 * start-up by every producer and consumer: `send()` to a queue never created returns null.
 */
export async function createQueues(boss: PgBoss): Promise<void> {
  await boss.createQueue(`${QUEUES.analyzeCapture}.dead`, { name: `${QUEUES.analyzeCapture}.dead`, policy: 'standard' });
  await boss.createQueue(QUEUES.analyzeCapture, {
    name: QUEUES.analyzeCapture,
    policy: 'standard',
    retryLimit: 4,
    retryDelay: 5,
    retryBackoff: true,
    expireInSeconds: 300,
    deadLetter: `${QUEUES.analyzeCapture}.dead`,
  });
  await boss.createQueue(QUEUES.sendNotifications, {
    name: QUEUES.sendNotifications,
    policy: 'standard',
    retryLimit: 10,
    retryDelay: 30,
    retryBackoff: true,
    expireInSeconds: 120,
  });
}
