import { QUEUES } from '@earmark/contracts';
import { createTestDatabase, type TestDatabase } from '@earmark/db/testing';
import type PgBoss from 'pg-boss';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startBoss } from '@earmark/platform';

let db: TestDatabase;
let boss: PgBoss;
beforeAll(async () => {
  db = await createTestDatabase();
  boss = await startBoss(db.url, pino({ level: 'silent' }));
});
afterAll(async () => {
  await boss.stop({ graceful: false, wait: true });
  await db.drop();
});

describe('worker queues', () => {
  it('creates every queue with retry and dead-letter settings at start-up', async () => {
    const queue = await boss.getQueue(QUEUES.analyzeCapture);
    expect(queue).toMatchObject({ retryLimit: 4, deadLetter: `${QUEUES.analyzeCapture}.dead` });
    expect(await boss.getQueue(QUEUES.sendNotifications)).not.toBeNull();
    // The dead-letter handler is what gives a capture its `error` verdict: it must outlast an outage.
    expect(await boss.getQueue(`${QUEUES.analyzeCapture}.dead`)).toMatchObject({ retryLimit: 12, retryBackoff: true });
  });

  it('round-trips a job through a created queue (send never returns null)', async () => {
    const id = await boss.send(QUEUES.analyzeCapture, { captureId: '00000000-0000-4000-8000-000000000003' });
    expect(id).toBeTruthy();
    const [job] = await boss.fetch<{ captureId: string }>(QUEUES.analyzeCapture);
    expect(job?.data.captureId).toBe('00000000-0000-4000-8000-000000000003');
  });
});
