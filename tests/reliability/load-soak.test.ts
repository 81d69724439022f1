import { createTestDatabase } from '@earmark/db/testing';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditConsistency } from './support/audit.js';
import { seedCatalog } from './support/catalog.js';
import { runLoad } from './support/load.js';
import { reliability } from './support/mode.js';
import { startProcessStack, type ProcessStack } from './support/process-stack.js';
import { recordFigures, resetFigures } from './support/results.js';
import { runSoak } from './support/soak.js';

/**
 * Load (CI clients uploading 1 MB captures back to back) and soak (many captures over many builds,
 * a worker killed on the way): afterwards rows, objects and verdicts must agree exactly.
 * Quick inside `npm test`; full sizes and figure targets with `npm run test:reliability`.
 */
const SLOTS = 2;
let stack: ProcessStack;

beforeAll(async () => {
  stack = await startProcessStack({ database: await createTestDatabase() });
  await seedCatalog(stack.orm, stack.fixture);
  await stack.startWorker({ EARMARK_WORKER_CONCURRENCY: String(SLOTS), EARMARK_ANALYSIS_SLOTS: String(SLOTS) });
});
afterAll(() => stack?.close());

describe(`load: ${reliability.load.clients} CI clients × ${reliability.load.seconds} s, 1 MB captures`, () => {
  it('accepts every upload, judges every capture once, and keeps /api/health answering', async () => {
    resetFigures('load');
    const { clients, seconds } = reliability.load;
    const result = await runLoad(stack, { clients, seconds, analysisSlots: SLOTS, drainTimeoutMs: reliability.full ? 900_000 : 90_000 });
    // Back-pressure (503 busy, 429) with Retry-After is allowed; any other refusal, a 500 or a dropped connection is not.
    const unexpected = Object.entries(result.refused).filter(([status]) => status !== '503' && status !== '429');
    const size = `${clients} clients × ${seconds} s`;
    recordFigures('load', [
      { name: 'accepted captures per second', value: result.acceptedPerSecond, unit: '/s', note: `${result.accepted} accepted, ${size}; refused with back-pressure (retried after Retry-After): ${JSON.stringify(result.refused)}` },
      { name: 'upload p50', value: result.upload.p50, unit: 'ms' },
      { name: 'upload p95', value: result.upload.p95, unit: 'ms' },
      { name: 'upload p99', value: result.upload.p99, unit: 'ms' },
      { name: 'submit → verdict p50', value: result.submitToVerdict.p50, unit: 'ms', note: 'includes the time queued behind the backlog' },
      { name: 'submit → verdict p95', value: result.submitToVerdict.p95, unit: 'ms' },
      { name: 'submit → verdict p99', value: result.submitToVerdict.p99, unit: 'ms' },
      { name: '/api/health p99 during the load', value: result.health.p99, unit: 'ms', target: { kind: 'max', value: 50 }, note: `${result.health.n} probes every 100 ms, ${result.health.failures} failed` },
      { name: 'verdicts per second at saturation', value: result.verdictsPerSecond, unit: '/s', note: result.saturated ? 'a backlog stood when the uploads stopped' : 'no backlog formed: the rate is the arrival rate, not saturation' },
      { name: 'engine alone (judgeCapture in-process)', value: result.engineCapturesPerSecond, unit: 'captures/s' },
      { name: `service efficiency (1 worker, ${SLOTS} slots)`, value: result.efficiency, unit: '', target: { kind: 'min', value: 0.8 } },
    ]);
    expect(unexpected, `uploads refused other than by back-pressure: ${JSON.stringify(result.refused)}`).toEqual([]);
    expect(result.unclean, 'refusals without Retry-After or not problem+json').toBe(0);
    expect(result.accepted).toBeGreaterThan(0);
    expect(result.judged).toBe(result.accepted);
    expect(result.health.failures).toBe(0);
    const audit = await auditConsistency(stack.orm, stack.objectStore, result.shas);
    expect(audit).toMatchObject({ captures: result.accepted, objects: result.accepted, orphanObjects: [], missingObjects: [], duplicateVerdicts: [], unjudged: [], statusMismatch: [] });
  }, 1_200_000);
});

describe(`soak: ${reliability.soak.captures} captures over ${reliability.soak.builds} builds, a worker SIGKILLed half-way`, () => {
  it('ends with rows, objects and verdicts matching exactly: no orphan object, no duplicate verdict, every capture judged once', async () => {
    resetFigures('soak');
    const result = await runSoak(stack, { ...reliability.soak, drainTimeoutMs: reliability.full ? 3_600_000 : 120_000 });
    const { audit } = result;
    recordFigures('soak', [
      { name: 'captures uploaded', value: result.accepted, unit: '', note: `${reliability.soak.captures} over ${reliability.soak.builds} builds, 8 uploaders, 0.5 s captures; a worker SIGKILLed after half` },
      { name: 'orphan objects', value: audit.orphanObjects.length, unit: '', target: { kind: 'max', value: 0 } },
      { name: 'capture rows without an object', value: audit.missingObjects.length, unit: '', target: { kind: 'max', value: 0 } },
      { name: 'duplicate verdicts', value: audit.duplicateVerdicts.length, unit: '', target: { kind: 'max', value: 0 } },
      { name: 'captures without a verdict', value: audit.unjudged.length, unit: '', target: { kind: 'max', value: 0 } },
      { name: 'soak duration (uploads and drain)', value: Math.round(result.seconds), unit: 's' },
    ]);
    expect(result.failedUploads).toEqual({});
    expect(audit).toEqual({ captures: reliability.soak.captures, objects: reliability.soak.captures, orphanObjects: [], missingObjects: [], duplicateVerdicts: [], unjudged: [], statusMismatch: [] });
  }, 3_700_000);
});
