import http from 'node:http';
import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { ApiToken, MaskRevision, Target, TestCase, initOrm, seedRoles, testCaseSettings } from '@earmark/db';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { generateTokenSecret } from '@earmark/platform';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BuiltProcess } from '../support/built-process.js';
import { startProductionServices, type ProductionServices } from '../support/production-stack.js';
import { waitFor } from '../support/wait-for.js';

/**
 * Issue 13: stopping production processes loses nothing. The built API, sent SIGTERM half-way
 * through an upload, still answers it (202, row written) while refusing new work, then exits 0.
 * A built worker, sent SIGTERM while it holds an analysis, gives the job back within its drain
 * time and exits; another worker judges that capture exactly once.
 */
const FS = 48000;
const CASE = 'level.tone';
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 1, levelDbfs: -20, frequency: 1000 });
const wav = Buffer.from(encodeWav([Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround)], FS, { encoding: 'float', bitsPerSample: 32 }));
const mask: MaskCheckInput[] = [{ id: 'level', kind: 'level', metric: 'rms-dbfs', min: -23, max: -17 }];

let services: ProductionServices;
let ciToken = '';
const started: BuiltProcess[] = [];
const outputOf = () => started.map((p) => `--- ${p.name}:\n${p.output().slice(-2500)}`).join('\n');
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * An upload whose body trickles in: the headers and the first chunk go at once, the rest only
 * when `finish()` is called, a chunk every 100 ms. Resolves with the API's answer.
 */
function slowUpload(url: string, sha: string, key: string) {
  const req = http.request(`${url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${CASE}&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${ciToken}`, 'content-type': 'audio/wav', 'content-length': String(wav.length), 'idempotency-key': key },
  });
  const answer = new Promise<{ status: number; body: string }>((resolve, reject) => {
    req.on('response', (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (c: string) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', reject);
  });
  const chunk = Math.ceil(wav.length / 10);
  req.write(wav.subarray(0, chunk));
  return {
    answer,
    async finish() {
      for (let at = chunk; at < wav.length; at += chunk) {
        await sleep(100);
        req.write(wav.subarray(at, at + chunk));
      }
      req.end();
      return answer;
    },
  };
}

async function upload(url: string, sha: string): Promise<CaptureDto> {
  const res = await fetch(`${url}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${CASE}&target=board`, {
    method: 'POST',
    headers: { authorization: `Bearer ${ciToken}`, 'content-type': 'audio/wav' },
    body: wav,
  });
  const text = await res.text();
  expect(res.status, text).toBe(202);
  return JSON.parse(text) as CaptureDto;
}

/** What a request sent after the signal gets: a status, or the error code of a refused connection. */
async function requestAfterSignal(url: string): Promise<number | string> {
  try {
    return (await fetch(`${url}/api/health`)).status;
  } catch (error) {
    return ((error as Error & { cause?: { code?: string } }).cause?.code ?? String(error));
  }
}

const verdictsOf = async (captureId: string) => services.query<{ outcome: string }>('select outcome from verdict where capture_id = $1', [captureId]);

beforeAll(async () => {
  services = await startProductionServices({ migrate: true });
  const orm = await initOrm({ url: services.database.appUrl, poolMax: 2 });
  try {
    const em = orm.em.fork();
    const fixture = await seedRoles(em);
    const project = fixture.project.id;
    em.create(Target, { project, key: 'board', name: 'Board', sampleRate: FS });
    const testCase = em.create(TestCase, { project, key: CASE, name: 'Level tone', stimulus: spec });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks: mask, settings: testCaseSettings(testCase), author: fixture.users.engineer.id, reviewer: fixture.users.qa_manager.id });
    const secret = generateTokenSecret();
    em.create(ApiToken, { project, name: 'ci', prefix: secret.prefix, secretHash: secret.hash, scopes: ['submit-captures', 'read-verdicts'], createdBy: fixture.users.admin.id });
    await em.flush();
    ciToken = secret.token;
  } finally {
    await orm.close();
  }
}, 120_000);

afterAll(async () => {
  await services?.close();
}, 60_000);

describe('production processes stop without losing work', () => {
  it('API SIGTERM during a slow upload: that upload still gets 202 and its row, new requests are refused, exit 0', async () => {
    const api = await services.startApi('api-draining');
    started.push(api);
    const inFlight = slowUpload(api.url, 'd1a0000001', 'drain-upload-1');
    await sleep(500); // the request is in the API's hands: headers read, its body still coming

    api.child.kill('SIGTERM');
    await waitFor(() => api.output().includes('shutting down'), { what: 'the API to log its shutdown', timeoutMs: 5000, context: outputOf });
    const late = await requestAfterSignal(api.url);
    expect([503, 'ECONNREFUSED'], `a request after the signal got ${late}`).toContain(late);

    const answer = await inFlight.finish();
    expect(answer.status, answer.body).toBe(202);
    const capture = JSON.parse(answer.body) as CaptureDto;
    const rows = await services.query<{ id: string; status: string; idempotency_key: string }>('select id, status, idempotency_key from capture');
    expect(rows).toEqual([{ id: capture.id, status: 'queued', idempotency_key: 'drain-upload-1' }]);
    expect(await api.exited, api.output()).toBe(0);
  }, 60_000);

  it('worker SIGTERM while it holds an analysis: it exits within its drain time and another worker judges the capture once', async () => {
    const api = await services.startApi('api-2');
    started.push(api);
    // Holds every analysis 20 s after marking its capture `analysing`; may keep a job only 2 s after SIGTERM.
    const holding = await services.startWorker('worker-holding', { EARMARK_ANALYSIS_DELAY_MS: '20000', EARMARK_WORKER_DRAIN_S: '2' });
    started.push(holding);
    await upload(api.url, 'd2b0000002');
    const all = (await services.query<{ id: string }>('select id from capture')).map((r) => r.id);
    expect(all).toHaveLength(2);

    const held = await waitFor(
      async () => (await services.query<{ id: string }>("select id from capture where status = 'analysing'"))[0]?.id,
      { what: 'the holding worker to start an analysis', timeoutMs: 20_000, context: outputOf },
    );
    const signalledAt = Date.now();
    holding.child.kill('SIGTERM');
    const code = await holding.exited;
    const tookMs = Date.now() - signalledAt;
    expect(code, holding.output()).toBe(0);
    expect(tookMs, `the worker took ${tookMs} ms to exit after SIGTERM`).toBeLessThan(6000);
    expect(await verdictsOf(held)).toEqual([]);

    const second = await services.startWorker('worker-2');
    started.push(second);
    await waitFor(async () => (await services.query<{ n: number }>('select count(distinct capture_id)::int as n from verdict'))[0]!.n === all.length, {
      what: 'a verdict for every capture from the second worker',
      timeoutMs: 45_000,
      intervalMs: 200,
      context: outputOf,
    });
    await sleep(1000); // time enough for a duplicate to show
    for (const id of all) expect(await verdictsOf(id), `verdicts of capture ${id}`).toEqual([{ outcome: 'pass' }]);
    // The held job came back as a retry, and the second worker ran it.
    const judged = second.logLines().filter((l) => l.msg === 'capture judged' && l.captureId === held);
    expect(judged.map((l) => ({ attempt: l.attempt, written: l.written }))).toEqual([{ attempt: 2, written: true }]);
    expect(holding.logLines().filter((l) => l.msg === 'capture judged')).toEqual([]);
  }, 90_000);
});
