import path from 'node:path';
import { DEMO_PASSWORD, demoUsers } from '@earmark/db';
import { startDevDatabase } from '../dev-database.js';
import type { Cluster } from '../postgres.js';
import { startS3Fake } from '../fakes/s3-fake.js';
import { startSmtpFake } from '../fakes/smtp-fake.js';
import { seedDemoBuilds } from '../demo-builds.js';
import { seedDemoScenario } from '../demo.js';
import { reevaluateStaleDemoVerdicts } from '../demo-reevaluate.js';
import { dataDir, repoRoot } from '../paths.js';
import { assertPortFree, waitForPort } from '../ports.js';
import { loadLocalSecrets } from '../secrets.js';
import { loadSettings } from '../settings.js';
import { Supervisor } from '../supervisor.js';
import { ensureWebBuilt, webDist } from '../web-build.js';

const log = (line: string) => console.log(`earmark: ${line}`);

/**
 * `npm start`: private PostgreSQL, migrations, demo seed, web build, API and worker,
 * all on loopback. Ctrl-C stops everything it started, the cluster included.
 */
export async function startCommand(): Promise<number> {
  // Everything npm start writes (.data, the mail fake's inbox, logs) is for this user alone.
  process.umask(0o077);
  const settings = loadSettings();
  await assertPortFree(settings.EARMARK_API_PORT, 'the API', 'EARMARK_API_PORT');
  await assertPortFree(settings.EARMARK_S3_PORT, 'the S3 fake', 'EARMARK_S3_PORT');
  await assertPortFree(settings.EARMARK_SMTP_PORT, 'the SMTP fake', 'EARMARK_SMTP_PORT');
  await assertPortFree(settings.EARMARK_INBOX_PORT, 'the mail inbox', 'EARMARK_INBOX_PORT');
  const { cluster, url } = await startDevDatabase(settings, log);
  const s3 = await startS3Fake({ port: settings.EARMARK_S3_PORT, directory: path.join(dataDir, 's3'), bucket: 'earmark-captures' });
  const smtp = await startSmtpFake({ smtpPort: settings.EARMARK_SMTP_PORT, webPort: settings.EARMARK_INBOX_PORT });
  const demoToken = await seedDemoScenario(url);
  ensureWebBuilt(log);

  let exitCode = 0;
  let shuttingDown: Promise<void> | null = null;
  let markDone: () => void = () => {};
  const done = new Promise<void>((resolve) => (markDone = resolve));
  const supervisor = new Supervisor((name, code) => {
    console.error(`earmark: the ${name} exited unexpectedly (code ${code}); stopping everything.`);
    exitCode = 1;
    void shutdown();
  });
  const shutdown = () =>
    (shuttingDown ??= (async () => {
      log('stopping…');
      await supervisor.stopAll();
      await s3.close().catch(() => {});
      await smtp.close().catch(() => {});
      cluster.stop();
      log('stopped.');
      markDone();
    })());

  const env = {
    ...process.env,
    // The demo: development defaults (the fakes) even in a shell that exports NODE_ENV=production.
    EARMARK_MODE: 'development',
    EARMARK_DATABASE_URL: url,
    EARMARK_JWT_SECRET: settings.EARMARK_JWT_SECRET ?? loadLocalSecrets().jwtSecret,
    EARMARK_API_PORT: String(settings.EARMARK_API_PORT),
    EARMARK_WEB_DIST: webDist,
    EARMARK_LOG_LEVEL: settings.EARMARK_LOG_LEVEL,
    ...(settings.EARMARK_ANALYSIS_SLOTS ? { EARMARK_ANALYSIS_SLOTS: String(settings.EARMARK_ANALYSIS_SLOTS) } : {}),
    EARMARK_S3_ENDPOINT: s3.endpoint,
    EARMARK_S3_BUCKET: 'earmark-captures',
    EARMARK_SMTP_HOST: '127.0.0.1',
    EARMARK_SMTP_PORT: String(smtp.smtpPort),
    EARMARK_PUBLIC_URL: `http://127.0.0.1:${settings.EARMARK_API_PORT}`,
    AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED: 'true',
  };
  supervisor.start('api', ['--import', 'tsx', 'src/server.ts'], { cwd: path.join(repoRoot, 'apps', 'api'), env });
  supervisor.start('worker', ['--import', 'tsx', 'src/worker.ts'], { cwd: path.join(repoRoot, 'apps', 'worker'), env });

  for (const signal of ['SIGINT', 'SIGTERM'] as const) process.once(signal, () => void shutdown());
  try {
    await waitForPort(settings.EARMARK_API_PORT, 60_000);
  } catch (error) {
    await shutdown();
    throw error;
  }
  if (demoToken && !shuttingDown) {
    await seedDemoBuilds(`http://127.0.0.1:${settings.EARMARK_API_PORT}`, demoToken, log).catch((error: unknown) =>
      log(`could not send the demo builds: ${error instanceof Error ? error.message : String(error)}`),
    );
  }
  if (!shuttingDown) {
    await reevaluateStaleDemoVerdicts(url, `http://127.0.0.1:${settings.EARMARK_API_PORT}`, log).catch((error: unknown) =>
      log(`could not re-evaluate the demo history: ${error instanceof Error ? error.message : String(error)}`),
    );
  }
  if (!shuttingDown) printWelcome(settings.EARMARK_API_PORT, cluster, demoToken, smtp.inboxUrl, s3.endpoint);
  await done;
  return exitCode;
}

function printWelcome(apiPort: number, cluster: Cluster, demoToken: string | null, inboxUrl: string, s3Url: string): void {
  const lines = [
    '',
    `  Earmark is running:  http://127.0.0.1:${apiPort}/`,
    `  API:                 http://127.0.0.1:${apiPort}/api   (CI routes under /api/v1)`,
    `  API reference:       http://127.0.0.1:${apiPort}/api/docs`,
    `  Mail inbox:          ${inboxUrl}   (the SMTP fake; nothing leaves this machine)`,
    `  Object store:        ${s3Url}   (S3 fake, objects under .data/s3)`,
    `  PostgreSQL:          127.0.0.1:${cluster.port} (private cluster in ${cluster.dataDir})`,
    '',
    `  Demo sign-ins (password ${DEMO_PASSWORD}):`,
    ...demoUsers.map((u) => `    ${(u.role ?? 'admin').padEnd(11)} ${u.email}`),
    '',
    `  Demo CI token (project kestrel-buds): ${demoToken ?? '(not available: remove .data/ to reseed)'}`,
    '',
    '  Press Ctrl-C to stop everything.',
    '',
  ];
  console.log(lines.join('\n'));
}
