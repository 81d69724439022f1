import { QUEUES } from '@earmark/contracts';
import pino from 'pino';
import type PgBoss from 'pg-boss';
import { describe, expect, it } from 'vitest';
import { startBoss } from '@earmark/platform';
import { createTestDatabase } from '@earmark/db/testing';

const silent = pino({ level: 'silent' });

describe('queues at start-up', () => {
  it('the API and the worker starting together on a fresh database both come up with every queue', async () => {
    // `npm start` starts both processes at once: pg-boss's create_queue could deadlock between
    // them (seen once as the API exiting with PostgreSQL 40P01). Three fresh databases, each with
    // three bosses starting at the same moment.
    for (let round = 0; round < 3; round++) {
      const db = await createTestDatabase();
      const bosses: PgBoss[] = [];
      try {
        const started = await Promise.allSettled([0, 1, 2].map(() => startBoss(db.url, silent).then((b) => (bosses.push(b), b))));
        expect(started.map((s) => s.status)).toEqual(['fulfilled', 'fulfilled', 'fulfilled']);
        for (const name of [QUEUES.analyzeCapture, `${QUEUES.analyzeCapture}.dead`, QUEUES.evaluateImpact, QUEUES.sendNotifications, QUEUES.applyRetention]) {
          expect(await bosses[0]!.getQueue(name), name).toBeTruthy();
        }
      } finally {
        await Promise.all(bosses.map((b) => b.stop({ graceful: false, wait: true })));
        await db.drop();
      }
    }
  }, 60_000);
});
