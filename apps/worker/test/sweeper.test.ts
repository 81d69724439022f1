import { QUEUES, type AnalyzeCaptureJob, type EvaluateImpactJob } from '@earmark/contracts';
import { Build, Capture, Target, TestCase, Verdict } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { createLinks, type JobProducer } from '@earmark/domain';
import { startBoss } from '@earmark/platform';
import type PgBoss from 'pg-boss';
import { pino } from 'pino';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { ABANDON_AFTER_EXPIRIES, sweep } from '../src/sweeper.js';

const seeded = useSeededDatabase();
const logger = pino({ level: 'silent' });
const EXPIRE_S = 300;
let boss: PgBoss;

/** Records what the sweep queues instead of sending it. */
class RecordingJobs implements JobProducer {
  analysed: string[] = [];
  mail: string[] = [];
  async analyzeCapture(job: AnalyzeCaptureJob) {
    this.analysed.push(job.captureId);
    return 'job';
  }
  async evaluateImpact(_job: EvaluateImpactJob) {
    return 'job';
  }
  async sendMail(reason: string) {
    this.mail.push(reason);
    return 'job';
  }
}

let seq = 0;
async function captureAged(status: Capture['status'], ageSeconds: number): Promise<string> {
  const em = seeded.orm.em.fork();
  const { project } = seeded.fixture;
  seq += 1;
  const testCase = em.create(TestCase, { project: project.id, key: `sweep.case${seq}`, name: 'sweep', stimulus: { kind: 'silence', sampleRate: 48000, seconds: 1 } });
  const target = em.create(Target, { project: project.id, key: `sweep-target-${seq}`, name: 'sweep' });
  const build = em.create(Build, { project: project.id, sha: `5eed${seq.toString().padStart(3, '0')}` });
  const capture = em.create(Capture, {
    project: project.id, build, testCase, target, objectKey: `sweep/${seq}.wav`, sha256: '0'.repeat(64), sizeBytes: 100,
    format: { container: 'wav' }, sampleRate: 48000, channelCount: 1, frames: 4800, status, createdAt: new Date(Date.now() - ageSeconds * 1000),
  });
  await em.flush();
  return capture.id;
}

const run = (jobs: JobProducer) =>
  sweep({ orm: seeded.orm, jobs, logger, links: createLinks('http://earmark.test'), queuedAfterSeconds: 60, analysisExpireSeconds: EXPIRE_S });

beforeAll(async () => {
  boss = await startBoss(seeded.db.url, logger);
});
afterAll(async () => {
  await boss.stop({ graceful: false, wait: true });
});
beforeEach(async () => {
  await seeded.orm.em.fork().getConnection().execute(`delete from pgboss.job where name like 'analyze-capture%'`);
  await seeded.orm.em.fork().nativeUpdate(Capture, {}, { status: 'done' });
});

describe('the sweep', () => {
  it('re-queues a capture left analysing past the expiry with no job for it', async () => {
    const stuck = await captureAged('analysing', EXPIRE_S + 30);
    const jobs = new RecordingJobs();
    await run(jobs);
    expect(jobs.analysed).toEqual([stuck]);
  });

  it('re-queues one whose analysis job failed without leaving a verdict', async () => {
    const failed = await captureAged('analysing', EXPIRE_S + 30);
    const id = await boss.send(QUEUES.analyzeCapture, { captureId: failed });
    await seeded.orm.em.fork().getConnection().execute(`update pgboss.job set state = 'failed' where id = ?`, [id]);
    const jobs = new RecordingJobs();
    await run(jobs);
    expect(jobs.analysed).toEqual([failed]);
  });

  it('leaves alone a capture still within the expiry, or whose analysis or dead-letter job is still to run', async () => {
    await captureAged('analysing', EXPIRE_S - 60);
    const withJob = await captureAged('analysing', EXPIRE_S + 30);
    await boss.send(QUEUES.analyzeCapture, { captureId: withJob });
    const withDeadLetter = await captureAged('analysing', EXPIRE_S + 30);
    await boss.send(`${QUEUES.analyzeCapture}.dead`, { captureId: withDeadLetter });
    const jobs = new RecordingJobs();
    await run(jobs);
    expect(jobs.analysed).toEqual([]);
  });

  it(`judges error, as a last resort, a capture with no verdict after ${ABANDON_AFTER_EXPIRIES} expiries and no live job`, async () => {
    const queuedLong = await captureAged('queued', EXPIRE_S * ABANDON_AFTER_EXPIRIES + 60);
    const analysingLong = await captureAged('analysing', EXPIRE_S * ABANDON_AFTER_EXPIRIES + 60);
    const jobs = new RecordingJobs();
    await run(jobs);

    expect(jobs.analysed).toEqual([]);
    const em = seeded.orm.em.fork();
    for (const id of [queuedLong, analysingLong]) {
      expect((await em.findOneOrFail(Capture, { id })).status).toBe('error');
      const verdict = await em.findOneOrFail(Verdict, { capture: id });
      expect(verdict.outcome).toBe('error');
      expect(verdict.reason).toBe('Analysis abandoned: no verdict could be reached after repeated attempts.');
    }
  });
});
