// A stand-in for the Earmark API's CI routes (docs/ci.md), started by each test on
// 127.0.0.1:0. It checks what the CLI sends as the real server would (bearer token, JSON
// body, media type, raw-format headers, Idempotency-Key, Content-Length against the bytes)
// and answers with DTOs parsed through the contracts schemas, so a canned answer that
// drifts from the contract fails the test instead of passing silently.
import { createHash, randomUUID } from 'node:crypto';
import { createServer, type IncomingHttpHeaders, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import {
  BuildDetail,
  BuildRow,
  CaptureDto,
  PROBLEM_CONTENT_TYPE,
  Problem,
  RAW_FLOAT32_MEDIA_TYPE,
  UpsertBuildRequest,
  type CheckResultDto,
  type VerdictOutcome,
} from '@earmark/contracts';
import { decodeRawFloat32, decodeWav, type DecodedAudio } from '@earmark/dsp';

export const FAKE_TOKEN = 'em_fakeprefix_0123456789abcdefghijklmnopqrstuvwxyzABCDEFG';

export interface ReceivedRequest {
  method: string;
  path: string;
  query: URLSearchParams;
  headers: IncomingHttpHeaders;
  body: Buffer;
  /** Date.now() when the request arrived. */
  at: number;
}

export interface StoredCapture {
  key: string;
  dto: CaptureDto;
  bytes: Buffer;
  /** The outcome the analysis will reach, or `never` for one that stays in the queue. */
  planned: VerdictOutcome | 'never';
  polls: number;
  /** Date.now() at upload (for verdictAfterMs). */
  uploadedAt: number;
}

export interface FakeOptions {
  targets?: string[];
  testCases?: string[];
  /** Picks each capture's verdict from its bytes' SHA-256 (tests name files by content). Default: pass. */
  outcomeFor?: (sha256: string) => VerdictOutcome | 'never';
  /** GET polls a capture answers `analysing` before its verdict appears. */
  pollsUntilDone?: number;
  /** Instead of counting polls: the verdict appears this long after the upload, waking a held `?wait=` request as the real server does. */
  verdictAfterMs?: number;
  /** Answer the first N requests to this route with 503 and this Retry-After. */
  unavailable?: { route: 'builds' | 'captures'; times: number; retryAfter: string };
}

export interface FakeEarmarkServer {
  url: string;
  requests: ReceivedRequest[];
  captures: Map<string, StoredCapture>;
  /** Protocol slips the fake saw (also answered as 400 problems); tests expect none. */
  violations: string[];
  junitXml: (sha: string) => string;
  close: () => Promise<void>;
}

export const FAILING_CHECK: CheckResultDto = {
  id: 'mag.env',
  kind: 'magnitude-envelope',
  label: null,
  pass: false,
  measured: 4.2,
  limit: 2.9,
  margin: -1.3,
  unit: 'dB',
  worstHz: 8020,
};
const PASSING_CHECK: CheckResultDto = { id: 'thd', kind: 'distortion', label: 'THD', pass: true, measured: -72.4, limit: -60, margin: 12.4, unit: 'dB', worstHz: null };

class Refusal extends Error {
  constructor(
    readonly status: number,
    readonly title: string,
    detail: string,
  ) {
    super(detail);
  }
}

function sendJson(res: ServerResponse, status: number, body: unknown, contentType = 'application/json'): void {
  res.writeHead(status, { 'content-type': contentType }).end(JSON.stringify(body));
}

function sendProblem(res: ServerResponse, status: number, title: string, detail: string, headers: Record<string, string> = {}): void {
  const problem = Problem.parse({ type: `https://earmark.dev/problems/${status}`, title, status, detail });
  res.writeHead(status, { 'content-type': PROBLEM_CONTENT_TYPE, ...headers }).end(JSON.stringify(problem));
}

async function readBody(req: IncomingMessage): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of req) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

export async function startFakeEarmarkServer(options: FakeOptions = {}): Promise<FakeEarmarkServer> {
  const targets = options.targets ?? ['evt2-48k'];
  const testCases = options.testCases ?? ['eq.music.sweep'];
  const requests: ReceivedRequest[] = [];
  const captures = new Map<string, StoredCapture>();
  const builds = new Map<string, BuildRow>();
  const violations: string[] = [];
  let unavailableLeft = options.unavailable?.times ?? 0;
  let base = '';

  const junitXml = (sha: string): string =>
    `<?xml version="1.0" encoding="UTF-8"?>\n<testsuites name="fake-earmark ${sha}"><testsuite name="evt2-48k" tests="1" failures="0"><testcase name="eq.music.sweep"/></testsuite></testsuites>\n`;

  // A declaration with a `never` return, so TypeScript narrows after each refusal.
  function refuse(status: number, title: string, detail: string): never {
    if (status === 400) violations.push(detail);
    throw new Refusal(status, title, detail);
  }

  const verdictFor = (outcome: VerdictOutcome) => ({
    outcome,
    reason: outcome === 'error' ? 'the capture is 0.2 s long; the stimulus needs 5 s' : null,
    engineVersion: 'fake-1',
    maskRevisionId: outcome === 'error' ? null : randomUUID(),
    maskRevision: outcome === 'error' ? null : 3,
    createdAt: new Date().toISOString(),
    checks: outcome === 'pass' ? [PASSING_CHECK] : outcome === 'fail' ? [PASSING_CHECK, FAILING_CHECK] : [],
  });

  function upsertBuild(project: string, body: Buffer, req: IncomingMessage, res: ServerResponse): void {
    if (!/^application\/json\b/.test(req.headers['content-type'] ?? '')) refuse(400, 'Bad request', `build body sent as ${req.headers['content-type']}`);
    const parsed = UpsertBuildRequest.strict().safeParse(JSON.parse(body.toString('utf8')));
    if (!parsed.success) refuse(400, 'Bad request', `build body does not match UpsertBuildRequest: ${parsed.error.message}`);
    const request = parsed.data;
    const existing = builds.get(request.sha);
    const row = BuildRow.parse({
      id: existing?.id ?? randomUUID(),
      projectKey: project,
      sha: request.sha,
      label: request.label ?? existing?.label ?? null,
      branch: request.branch ?? existing?.branch ?? null,
      pipelineUrl: request.pipelineUrl ?? existing?.pipelineUrl ?? null,
      status: 'pending',
      createdAt: existing?.createdAt ?? new Date().toISOString(),
      captureCount: [...captures.values()].filter((c) => c.dto.buildSha === request.sha).length,
    });
    builds.set(request.sha, row);
    sendJson(res, existing ? 200 : 201, row);
  }

  function uploadCapture(project: string, sha: string, query: URLSearchParams, body: Buffer, req: IncomingMessage, res: ServerResponse): void {
    if (!builds.has(sha)) refuse(404, 'Not found', `There is no build ${sha} in ${project}.`);
    const testCase = query.get('testCase') ?? '';
    if (!testCases.includes(testCase)) refuse(404, 'Not found', `There is no test case ${testCase} in ${project}.`);
    const targetParam = query.get('target');
    const target = targetParam ?? (targets.length === 1 ? targets[0] : undefined);
    if (target === undefined) refuse(422, 'Unprocessable content', `${project} has ${targets.length} targets; name one with ?target=.`);
    if (!targets.includes(target)) refuse(404, 'Not found', `There is no target ${target} in ${project}.`);
    const key = req.headers['idempotency-key'];
    if (typeof key !== 'string' || !/^[\x21-\x7e]{1,200}$/.test(key)) refuse(400, 'Bad request', `Idempotency-Key missing or malformed: ${String(key)}`);
    if (req.headers['content-length'] !== String(body.length)) refuse(400, 'Bad request', `Content-Length ${req.headers['content-length']} but ${body.length} bytes arrived`);
    const mediaType = req.headers['content-type'];
    let audio: DecodedAudio;
    if (mediaType === 'audio/wav') {
      audio = decodeWav(new Uint8Array(body));
    } else if (mediaType === RAW_FLOAT32_MEDIA_TYPE) {
      const rate = Number(req.headers['x-sample-rate']);
      const channels = Number(req.headers['x-channels']);
      if (!Number.isInteger(rate) || !Number.isInteger(channels)) refuse(400, 'Bad request', 'raw upload without X-Sample-Rate / X-Channels');
      audio = decodeRawFloat32(new Uint8Array(body), { sampleRate: rate, channels });
    } else {
      return refuse(415, 'Unsupported media type', `Send a capture as audio/wav or ${RAW_FLOAT32_MEDIA_TYPE}; got ${mediaType}.`);
    }
    const sha256 = createHash('sha256').update(body).digest('hex');
    const seen = captures.get(key);
    if (seen) {
      if (!seen.bytes.equals(body)) refuse(400, 'Bad request', 'the same Idempotency-Key came with different bytes');
      sendJson(res, 200, seen.dto);
      return;
    }
    const id = randomUUID();
    const dto = CaptureDto.parse({
      id,
      projectKey: project,
      buildSha: sha,
      testCase,
      target,
      status: 'queued',
      sha256,
      sizeBytes: body.length,
      sampleRate: audio.sampleRate,
      channels: audio.channels.length,
      frames: audio.frames,
      createdAt: new Date().toISOString(),
      purgedAt: null,
      verdict: null,
      links: { self: `${base}/api/v1/captures/${id}`, build: `${base}/api/v1/projects/${project}/builds/${sha}`, dashboard: `${base}/projects/${project}/builds/${sha}/captures/${id}` },
    });
    captures.set(key, { key, dto, bytes: body, planned: options.outcomeFor?.(sha256) ?? 'pass', polls: 0, uploadedAt: Date.now() });
    sendJson(res, 202, dto);
  }

  /** `?wait=N` as the real server reads it: whole seconds 0–30, else 422. */
  function waitSeconds(query: URLSearchParams): number {
    const raw = query.get('wait');
    if (raw === null) return 0;
    if (!/^\d+$/.test(raw) || Number(raw) > 30) {
      violations.push(`wait=${raw} is not whole seconds from 0 to 30`);
      refuse(422, 'Invalid request', `wait must be whole seconds from 0 to 30; got ${raw}`);
    }
    return Number(raw);
  }

  function pollCapture(id: string, query: URLSearchParams, res: ServerResponse): void {
    const stored = [...captures.values()].find((c) => c.dto.id === id);
    if (!stored) return refuse(404, 'Not found', `There is no capture ${id}.`);
    const waitS = waitSeconds(query);
    if (waitS > 0 && stored.dto.verdict === null && stored.planned !== 'never' && options.verdictAfterMs !== undefined) {
      // Held until the verdict is due or the wait ends, whichever comes first.
      const dueIn = stored.uploadedAt + options.verdictAfterMs - Date.now();
      if (dueIn > 0) {
        setTimeout(() => answerPoll(stored, res), Math.min(dueIn, waitS * 1000)).unref();
        return;
      }
    } else if (waitS > 0 && stored.planned === 'never') {
      setTimeout(() => answerPoll(stored, res), waitS * 1000).unref();
      return;
    }
    answerPoll(stored, res);
  }

  function answerPoll(stored: StoredCapture, res: ServerResponse): void {
    stored.polls += 1;
    const due = options.verdictAfterMs === undefined ? stored.polls >= (options.pollsUntilDone ?? 1) : Date.now() >= stored.uploadedAt + options.verdictAfterMs;
    if (stored.planned !== 'never' && due && stored.dto.verdict === null) {
      const outcome = stored.planned;
      stored.dto = CaptureDto.parse({ ...stored.dto, status: outcome === 'error' ? 'error' : 'done', verdict: verdictFor(outcome) });
    } else if (stored.dto.verdict === null) {
      stored.dto = CaptureDto.parse({ ...stored.dto, status: 'analysing' });
    }
    sendJson(res, 200, stored.dto);
  }

  function buildDetail(project: string, sha: string, res: ServerResponse): void {
    const row = builds.get(sha);
    if (!row) return refuse(404, 'Not found', `There is no build ${sha} in ${project}.`);
    const mine = [...captures.values()].filter((c) => c.dto.buildSha === sha).map((c) => c.dto);
    const count = (o: string) => mine.filter((c) => (c.verdict?.outcome ?? 'pending') === o).length;
    const detail = BuildDetail.parse({
      ...row,
      captureCount: mine.length,
      counts: { pass: count('pass'), fail: count('fail'), error: count('error'), pending: count('pending') },
      captures: mine,
      links: { self: `${base}/api/v1/projects/${project}/builds/${sha}`, junit: `${base}/api/v1/projects/${project}/builds/${sha}/junit.xml`, dashboard: `${base}/projects/${project}/builds/${sha}` },
    });
    sendJson(res, 200, detail);
  }

  const server = createServer((req, res) => {
    void (async () => {
      const url = new URL(req.url ?? '/', 'http://fake');
      const at = Date.now();
      const body = await readBody(req);
      requests.push({ method: req.method ?? '', path: url.pathname, query: url.searchParams, headers: req.headers, body, at });
      try {
        if (req.headers.authorization !== `Bearer ${FAKE_TOKEN}`) refuse(401, 'Unauthorized', 'Unknown API token.');
        const parts = url.pathname.split('/').map(decodeURIComponent);
        const route = `${req.method} ${url.pathname}`;
        const is = (pattern: RegExp) => pattern.test(route);
        const unavailableRoute = is(/^POST \/api\/v1\/projects\/[^/]+\/builds$/) ? 'builds' : is(/\/captures$/) ? 'captures' : null;
        if (unavailableLeft > 0 && unavailableRoute === options.unavailable?.route) {
          unavailableLeft -= 1;
          return sendProblem(res, 503, 'Service unavailable', 'Capture storage is unavailable right now; nothing was stored.', { 'retry-after': options.unavailable.retryAfter });
        }
        // parts: ['', 'api', 'v1', 'projects', project, 'builds', sha, …]
        const project = parts[4] ?? '';
        const sha = parts[6] ?? '';
        if (is(/^POST \/api\/v1\/projects\/[^/]+\/builds$/)) return upsertBuild(project, body, req, res);
        if (is(/^POST \/api\/v1\/projects\/[^/]+\/builds\/[^/]+\/captures$/)) return uploadCapture(project, sha, url.searchParams, body, req, res);
        if (is(/^GET \/api\/v1\/captures\/[^/]+$/)) return pollCapture(parts[4] ?? '', url.searchParams, res);
        if (is(/^GET \/api\/v1\/projects\/[^/]+\/builds\/[^/]+\/junit\.xml$/)) {
          if (!builds.has(sha)) refuse(404, 'Not found', `There is no build ${sha}.`);
          res.writeHead(200, { 'content-type': 'application/xml' }).end(junitXml(sha));
          return;
        }
        if (is(/^GET \/api\/v1\/projects\/[^/]+\/builds\/[^/]+$/)) return buildDetail(project, sha, res);
        refuse(404, 'Not found', `No route for ${route}`);
      } catch (error) {
        if (error instanceof Refusal) sendProblem(res, error.status, error.title, error.message);
        else sendProblem(res, 500, 'Internal server error', `fake server: ${(error as Error).message}`);
      }
    })();
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return {
    url: base,
    requests,
    captures,
    violations,
    junitXml,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
