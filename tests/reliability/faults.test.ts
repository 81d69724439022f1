import { Notification } from '@earmark/db';
import { createTestDatabase } from '@earmark/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { waitFor } from '../support/wait-for.js';
import { auditConsistency, waitForVerdicts } from './support/audit.js';
import { passingCaptureWav, shaOf, shortSweepSpec, SOAK_CASE, seedCatalog, uploadCapture, type UploadResult } from './support/catalog.js';
import { reliability } from './support/mode.js';
import { startProcessStack, type ProcessStack } from './support/process-stack.js';
import { startRefusingSmtp } from './support/refusing-smtp.js';
import { recordFigures, resetFigures } from './support/results.js';

/**
 * Faults against the whole product as processes. Already covered elsewhere and not repeated
 * here: a worker SIGKILLed mid-analysis, an analysis that keeps dying, and mail kept while the
 * SMTP relay is down (tests/integration/pipeline.test.ts); the soak (load-soak.test.ts) also
 * SIGKILLs a worker with many jobs in flight. Full runs only.
 */
let stack: ProcessStack;
const wav = passingCaptureWav(shortSweepSpec);
const run = Date.now().toString(16).slice(-6);
const allShas: string[] = [];

interface Attempt {
  status: number;
  contentType: string;
  retryAfter: string | null;
}

/** Uploads with one Idempotency-Key until the capture is stored (200/202), as a CI client with retries would. */
async function uploadUntilStored(sha: string, key: string, deadlineMs: number): Promise<{ final: UploadResult; failures: Attempt[] }> {
  const failures: Attempt[] = [];
  const deadline = Date.now() + deadlineMs;
  for (;;) {
    const res = await uploadCapture(stack.url, stack.ciToken, sha, wav, { testCase: SOAK_CASE, headers: { 'idempotency-key': key } });
    if (res.status === 200 || res.status === 202 || Date.now() > deadline) return { final: res, failures };
    failures.push({ status: res.status, contentType: res.contentType, retryAfter: res.retryAfter });
    await new Promise((r) => setTimeout(r, 500));
  }
}

const workerSaid = () => `worker said:\n${stack.workers.map((w) => w.output.join('').slice(-3000)).join('\n---\n')}`;

async function expectConsistent(shas: string[], expected: number) {
  expect(await waitForVerdicts(stack.orm, shas, expected, 120_000)).toBe(expected);
  const audit = await auditConsistency(stack.orm, stack.objectStore, shas);
  expect(audit).toEqual({ captures: expected, objects: expected, orphanObjects: [], missingObjects: [], duplicateVerdicts: [], unjudged: [], statusMismatch: [] });
}

beforeAll(async () => {
  if (!reliability.full) return;
  stack = await startProcessStack({ database: await createTestDatabase() });
  await seedCatalog(stack.orm, stack.fixture);
  await stack.startWorker({ EARMARK_ANALYSIS_SLOTS: '2', EARMARK_MAIL_MAX_ATTEMPTS: '1' });
});
afterAll(() => stack?.close());

describe.skipIf(!reliability.full)('faults', () => {
  it('records the figures afresh', () => resetFigures('faults'));

  it('PostgreSQL restarted during uploads: in-flight uploads fail cleanly, succeed on retry, and the API recovers without a restart', async () => {
    const apiPid = stack.api.child.pid;
    const shas = [shaOf(`db${run}`, 0), shaOf(`db${run}`, 1)];
    allShas.push(...shas);
    let outageStarted = 0;
    let outageEnded = 0;
    let recovered = 0;
    const uploads = Array.from({ length: 16 }, (_, i) => async () => {
      await new Promise((r) => setTimeout(r, i * 150));
      return uploadUntilStored(shas[i % 2]!, `db-${run}-${i}`, 60_000);
    });
    const outage = (async () => {
      await new Promise((r) => setTimeout(r, 600));
      outageStarted = Date.now();
      await stack.database.outage(5000);
      outageEnded = Date.now();
      recovered = await waitFor(async () => ((await fetch(`${stack.url}/api/health`).then((r) => r.status, () => 0)) === 200 ? Date.now() : null), { what: 'the API healthy again', timeoutMs: 30_000, intervalMs: 50 });
    })();
    const results = await Promise.all([...uploads.map((u) => u()), outage]).then((r) => r.slice(0, 16) as Awaited<ReturnType<typeof uploadUntilStored>>[]);
    const failures = results.flatMap((r) => r.failures);
    const byStatus = failures.reduce<Record<number, number>>((acc, f) => ({ ...acc, [f.status]: (acc[f.status] ?? 0) + 1 }), {});
    recordFigures('faults', [
      { name: 'database restart: uploads that failed and were retried', value: failures.length, unit: 'attempts', note: `answers by status ${JSON.stringify(byStatus)}; all 16 stored in the end` },
      { name: 'database restart: API healthy again after the database returned', value: Math.max(0, recovered - outageEnded), unit: 'ms', note: `outage of ${outageEnded - outageStarted} ms; same API process` },
    ]);
    expect(results.map((r) => r.final.status).every((s) => s === 200 || s === 202)).toBe(true);
    expect(failures.length, 'no upload met the outage: the test did not test it').toBeGreaterThan(0);
    // Clean failures: 503 problem+json with Retry-After, never a 500 or a dropped connection.
    expect(byStatus).toEqual({ 503: failures.length });
    for (const f of failures) {
      expect(f.contentType).toMatch(/^application\/problem\+json/);
      expect(Number(f.retryAfter)).toBeGreaterThan(0);
    }
    expect(stack.api.child.pid).toBe(apiPid);
    expect(stack.api.child.exitCode).toBeNull();
    await expectConsistent(shas, 16);
  }, 240_000);

  it('the object store down for 10 s: 503 with Retry-After, nothing written, then every capture stored and judged once', async () => {
    const sha = shaOf(`c3${run}`, 0);
    allShas.push(sha);
    // Stored just before the outage: their analysis meets the outage in the worker.
    for (let i = 0; i < 4; i++) expect((await uploadCapture(stack.url, stack.ciToken, sha, wav, { testCase: SOAK_CASE, headers: { 'idempotency-key': `s3-${run}-pre-${i}` } })).status).toBe(202);
    await stack.s3.stop();
    const downSince = Date.now();
    const during = await uploadCapture(stack.url, stack.ciToken, sha, wav, { testCase: SOAK_CASE, headers: { 'idempotency-key': `s3-${run}-during` } });
    const retryAfter = during.status === 503 ? JSON.parse(during.text) : null;
    expect(during.status, during.text).toBe(503);
    expect(during.contentType).toMatch(/^application\/problem\+json/);
    expect(retryAfter).toMatchObject({ status: 503 });
    expect(Number(during.retryAfter)).toBeGreaterThan(0);
    const [written] = await stack.orm.em.fork().getConnection().execute<{ n: string }[]>(`select count(*) as n from capture where idempotency_key = ?`, [`s3-${run}-during`]);
    expect(Number(written!.n)).toBe(0);
    expect((await fetch(`${stack.url}/api/health`)).status).toBe(200);
    await new Promise((r) => setTimeout(r, Math.max(0, 10_000 - (Date.now() - downSince))));
    await stack.s3.restart();
    const after = await uploadUntilStored(sha, `s3-${run}-during`, 30_000);
    expect(after.final.status).toBe(202);
    recordFigures('faults', [{ name: 'object store down 10 s: upload answer', value: during.status, unit: 'HTTP', note: 'problem+json with Retry-After; nothing written; the retry after the outage stored it' }]);
    await expectConsistent([sha], 5);
  }, 180_000);

  it('the SMTP relay down, then a relay that refuses one recipient for good: that mail is failed after its last attempt, the rest is sent', async () => {
    await stack.smtp.stop();
    const em = stack.orm.em.fork();
    const refused = em.create(Notification, { kind: 'reliability-test', recipient: 'gone@example.test', subject: `refused ${run}`, body: 'a mail the relay refuses' });
    const fine = em.create(Notification, { kind: 'reliability-test', recipient: 'engineer@example.test', subject: `accepted ${run}`, body: 'a mail the relay takes' });
    await em.flush();
    const ids = [refused.id, fine.id];
    const rows = async () => em.fork().find(Notification, { id: { $in: ids } }, { orderBy: { recipient: 'asc' } });
    // Relay unreachable: the mail job fails and is retried; both rows stay pending with no attempt
    // charged (pipeline.test.ts checks delivery once the relay returns).
    const conn = stack.orm.em.fork().getConnection();
    await waitFor(async () => (await conn.execute<{ n: string }[]>(`select count(*) as n from pgboss.job where name = 'send-notifications' and retry_count > 0`))[0]!.n !== '0', {
      what: 'the mail job to fail against the unreachable relay and be retried',
      timeoutMs: 20_000,
      context: workerSaid,
    });
    expect((await rows()).map((n) => [n.state, n.attempts])).toEqual([['pending', 0], ['pending', 0]]);

    const relay = await startRefusingSmtp(stack.smtp.port, ['gone@example.test']);
    try {
      const settled = await waitFor(async () => {
        const r = await rows();
        return r.every((n) => n.state !== 'pending') ? r : null;
      }, { what: 'both mails settled', timeoutMs: 30_000, context: workerSaid });
      expect(settled.map((n) => [n.recipient, n.state, n.attempts])).toEqual([
        ['engineer@example.test', 'sent', 0],
        ['gone@example.test', 'failed', 1],
      ]);
      expect(settled[1]!.lastError).toMatch(/550/);
      expect(relay.accepted).toContain('engineer@example.test');
      expect(relay.accepted).not.toContain('gone@example.test');
    } finally {
      await relay.close();
      await stack.smtp.restart();
    }
  }, 90_000);

  it('SIGTERM of the API under load: requests in flight finish, nothing is half-written', async () => {
    const sha = shaOf(`5e${run}`, 0);
    allShas.push(sha);
    const inFlight: Promise<UploadResult>[] = [];
    let n = 0;
    let stopped = false;
    const clients = Array.from({ length: 6 }, async () => {
      while (!stopped) {
        const p = uploadCapture(stack.url, stack.ciToken, sha, wav, { testCase: SOAK_CASE, headers: { 'idempotency-key': `term-${run}-${n++}` } });
        inFlight.push(p);
        await p;
      }
    });
    await new Promise((r) => setTimeout(r, 1500));
    // Everything sent before the signal must be answered in full.
    const sentBeforeSignal = [...inFlight];
    stopped = true;
    const exit = stack.api.signal('SIGTERM');
    const answers = await Promise.all(sentBeforeSignal);
    const exitCode = await exit;
    await Promise.all(clients);
    recordFigures('faults', [{ name: 'SIGTERM under load: requests in flight answered', value: answers.filter((a) => a.status === 202).length, unit: `of ${answers.length}`, note: `answers ${[...new Set(answers.map((a) => a.status))].join(', ')}; exit code ${exitCode}` }]);
    expect(answers.map((a) => a.status), answers.map((a) => a.text).join('\n')).toEqual(answers.map(() => 202));
    expect(exitCode).toBe(0);
    // Start it again for the audit and for the tests after this one.
    await stack.restartApi().catch(() => undefined);
    const accepted = (await Promise.all(inFlight)).filter((a) => a.status === 202).length;
    await expectConsistent([sha], accepted);
  }, 180_000);

  it('leaves every build of these faults consistent', async () => {
    const audit = await auditConsistency(stack.orm, stack.objectStore, allShas);
    expect(audit.orphanObjects).toEqual([]);
    expect(audit.duplicateVerdicts).toEqual([]);
  });
});
