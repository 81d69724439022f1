import { AnalyzeCaptureJob, QUEUES } from '@earmark/contracts';
import { ObjectStore, initOrm, startBoss } from '@earmark/db';
import { ENGINE_VERSION } from '@earmark/dsp';
import { pino } from 'pino';
import { loadWorkerEnv } from './env.js';
import { analyzeCapture } from './jobs/analyze-capture.job.js';
import { sendNotifications } from './jobs/send-notifications.job.js';
import { createMailer } from './mailer.js';
import { sweep } from './sweeper.js';
import { errorJudgement } from './verdicts/judgement.js';
import { recordVerdict } from './verdicts/record-verdict.js';
import { findMaskInForce } from './verdicts/mask-in-force.js';
import { Capture } from '@earmark/db';

const env = loadWorkerEnv();
const logger = pino({ name: 'worker', level: env.EARMARK_LOG_LEVEL });
const orm = await initOrm({ url: env.EARMARK_DATABASE_URL, poolMax: env.EARMARK_WORKER_CONCURRENCY + 2 });
const boss = await startBoss(env.EARMARK_DATABASE_URL, logger, {
  analyzeExpireSeconds: env.EARMARK_ANALYSIS_EXPIRE_S,
  retryDelaySeconds: env.EARMARK_JOB_RETRY_DELAY_S,
  maintenanceIntervalSeconds: env.EARMARK_JOB_MAINTENANCE_S,
  updateExisting: true,
});
const objectStore = new ObjectStore({
  endpoint: env.EARMARK_S3_ENDPOINT,
  bucket: env.EARMARK_S3_BUCKET,
  accessKeyId: env.EARMARK_S3_ACCESS_KEY,
  secretAccessKey: env.EARMARK_S3_SECRET_KEY,
});
const mailer = createMailer({ host: env.EARMARK_SMTP_HOST, port: env.EARMARK_SMTP_PORT, from: env.EARMARK_MAIL_FROM });
const base = env.EARMARK_PUBLIC_URL.replace(/\/$/, '');
const links = {
  buildPage: (project: string, sha: string) => `${base}/projects/${project}/builds/${sha}`,
  capturePage: (project: string, sha: string, id: string) => `${base}/projects/${project}/builds/${sha}/captures/${id}`,
};
const analyzeDeps = { orm, objectStore, boss, logger, links, maxAttempts: env.EARMARK_ANALYSIS_MAX_ATTEMPTS, delayMs: env.EARMARK_ANALYSIS_DELAY_MS };

// One work() per unit of concurrency; each job gets its own EntityManager fork.
for (let i = 0; i < env.EARMARK_WORKER_CONCURRENCY; i++) {
  await boss.work(QUEUES.analyzeCapture, { batchSize: 1, includeMetadata: true, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (job) await analyzeCapture(job, analyzeDeps);
  });
}
// Jobs that ran out of retries: the capture is judged `error`, never left pending.
await boss.work(`${QUEUES.analyzeCapture}.dead`, { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
  if (!job) return;
  const { captureId } = AnalyzeCaptureJob.parse(job.data);
  const em = orm.em.fork();
  const capture = await em.findOne(Capture, { id: captureId }, { populate: ['testCase', 'target'] });
  if (!capture) return;
  const mask = await findMaskInForce(em, capture.testCase, capture.target);
  await recordVerdict(em, captureId, mask, errorJudgement('Analysis abandoned: the job ran out of retries.', ENGINE_VERSION), links);
});
await boss.work(QUEUES.sendNotifications, { batchSize: 1, pollingIntervalSeconds: 1 }, async () => {
  await sendNotifications({ orm, mailer, logger });
});
// Impact of a mask revision on past builds (ImpactRun): one run at a time, progress in the row.
const { evaluateImpact } = await import('./jobs/evaluate-impact.job.js');
await boss.work(QUEUES.evaluateImpact, { batchSize: 1, pollingIntervalSeconds: 1 }, async ([job]) => {
  if (job) await evaluateImpact(job, { orm, objectStore, logger });
});

const sweepTimer = setInterval(() => {
  sweep(orm, boss, logger, env.EARMARK_SWEEP_INTERVAL_S * 2).catch((error: unknown) => logger.warn({ err: error }, 'sweep failed'));
}, env.EARMARK_SWEEP_INTERVAL_S * 1000);
logger.info({ concurrency: env.EARMARK_WORKER_CONCURRENCY, engineVersion: ENGINE_VERSION }, 'worker ready');

async function shutdown(signal: string) {
  logger.info({ signal }, 'worker stopping');
  clearInterval(sweepTimer);
  await boss.stop({ graceful: true, timeout: 10_000 });
  mailer.close();
  objectStore.destroy();
  await orm.close();
  process.exit(0);
}
process.on('SIGTERM', () => void shutdown('SIGTERM'));
process.on('SIGINT', () => void shutdown('SIGINT'));
