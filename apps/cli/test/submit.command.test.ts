// `earmark submit` end to end: the real binary against a fake Earmark API (support/) that
// checks every request the CLI makes. Each test has its own server and files.
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '@earmark/dsp';
import { FAKE_TOKEN, startFakeEarmarkServer, type FakeEarmarkServer, type FakeOptions, type ReceivedRequest } from './support/fake-earmark-server.js';
import { earmark } from './support/run-earmark.js';

const dir = mkdtempSync(join(tmpdir(), 'earmark-submit-cli-'));
const servers: FakeEarmarkServer[] = [];
afterAll(async () => {
  await Promise.all(servers.map((s) => s.close()));
  rmSync(dir, { recursive: true, force: true });
});

const SHA = 'abcdef1234567';
const PROJECT = 'kestrel-buds';

/** A short 16-bit WAV; the frequency makes each file's bytes (and so its planned verdict) distinct. */
function writeWav(name: string, hz: number): { path: string; bytes: Buffer; sha256: string } {
  const tone = Float64Array.from({ length: 4800 }, (_, i) => 0.25 * Math.sin((2 * Math.PI * hz * i) / 48_000));
  const bytes = Buffer.from(encodeWav([tone], 48_000, { encoding: 'pcm-int', bitsPerSample: 16 }));
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return { path, bytes, sha256: createHash('sha256').update(bytes).digest('hex') };
}

const pass = writeWav('pass.wav', 1000);
const fail = writeWav('fail.wav', 1500);
const broken = writeWav('broken.wav', 2000);
const slow = writeWav('slow.wav', 2500);

async function server(options: FakeOptions = {}): Promise<FakeEarmarkServer> {
  const planned: Record<string, 'fail' | 'error' | 'never'> = { [fail.sha256]: 'fail', [broken.sha256]: 'error', [slow.sha256]: 'never' };
  const s = await startFakeEarmarkServer({ outcomeFor: (sha) => planned[sha] ?? 'pass', ...options });
  servers.push(s);
  return s;
}

const common = (s: FakeEarmarkServer) => ['submit', '--server', s.url, '--token', FAKE_TOKEN, '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep'];
const uploads = (s: FakeEarmarkServer): ReceivedRequest[] => s.requests.filter((r) => r.method === 'POST' && r.path.endsWith('/captures'));
const run = (args: string[], env?: Record<string, string>) => earmark(args, { cwd: dir, ...(env ? { env } : {}) });

// Each run starts node + tsx (about 1 s, more on a busy machine), hence the generous timeout.
describe.concurrent('earmark submit', { timeout: 30_000 }, () => {
  it('passes: exit 0, a PASS line and the dashboard link; the server saw the build, auth, media type and exact bytes', async () => {
    const s = await server();
    const r = await run([...common(s), '--branch', 'main', '--label', 'v1.4.0-rc2', '--pipeline-url', 'https://ci.example.com/runs/812', '--target', 'evt2-48k', 'pass.wav', '--wait', '--timeout', '20']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout.split('\n')).toEqual([
      'PASS     eq.music.sweep  evt2-48k  pass.wav',
      '1 capture: 1 pass',
      `dashboard: ${s.url}/projects/${PROJECT}/builds/${SHA}`,
      '',
    ]);
    expect(s.violations).toEqual([]);
    const build = s.requests.find((q) => q.method === 'POST' && q.path === `/api/v1/projects/${PROJECT}/builds`);
    expect(JSON.parse(build?.body.toString('utf8') ?? '')).toEqual({ sha: SHA, branch: 'main', label: 'v1.4.0-rc2', pipelineUrl: 'https://ci.example.com/runs/812' });
    const [upload] = uploads(s);
    expect(upload?.path).toBe(`/api/v1/projects/${PROJECT}/builds/${SHA}/captures`);
    expect(Object.fromEntries(upload?.query ?? [])).toEqual({ testCase: 'eq.music.sweep', target: 'evt2-48k' });
    expect(upload?.headers['authorization']).toBe(`Bearer ${FAKE_TOKEN}`);
    expect(upload?.headers['content-type']).toBe('audio/wav');
    expect(upload?.headers['idempotency-key']).toMatch(/^emk1-[0-9a-f]{64}$/);
    expect(upload?.body.equals(pass.bytes)).toBe(true);
    expect(s.requests.filter((q) => q.method === 'GET' && q.path.startsWith('/api/v1/captures/')).length).toBeGreaterThanOrEqual(1);
  });

  it('keeps the Idempotency-Key stable across runs, so a re-run stores nothing twice; another target is another capture', async () => {
    const s = await server({ targets: ['evt2-48k', 'evt3-96k'] });
    const first = await run([...common(s), '--target', 'evt2-48k', 'pass.wav']);
    const [again, other] = await Promise.all([run([...common(s), '--target', 'evt2-48k', 'pass.wav']), run([...common(s), '--target', 'evt3-96k', 'pass.wav'])]);
    for (const r of [first, again, other]) expect(r.code, r.stderr).toBe(0);
    expect(first.stdout).toMatch(/^PENDING  eq\.music\.sweep  evt2-48k  pass\.wav  \(queued\)$/m);
    expect(again.stderr).toMatch(/uploaded pass\.wav \(9\.4 KiB\) as capture [0-9a-f-]{36}, already there from an earlier run/);
    const keyFor = (target: string) => uploads(s).filter((u) => u.query.get('target') === target).map((u) => u.headers['idempotency-key']);
    const [firstKey, againKey] = keyFor('evt2-48k');
    expect(againKey).toBe(firstKey);
    expect(keyFor('evt3-96k')).toHaveLength(1);
    expect(keyFor('evt3-96k')[0]).not.toBe(firstKey);
    expect(s.captures.size).toBe(2);
    expect(s.violations).toEqual([]);
  });

  it('fails: exit 1 and the failing check with margin, worst frequency, measured value and limit', async () => {
    const s = await server();
    const r = await run([...common(s), 'pass.wav', 'fail.wav', '--wait']);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stdout).toContain('PASS     eq.music.sweep  evt2-48k  pass.wav\n');
    expect(r.stdout).toContain('FAIL     eq.music.sweep  evt2-48k  fail.wav  mag.env: measured 4.20 dB, limit 2.90 dB, margin \u22121.30 dB at 8.02 kHz\n');
    expect(r.stdout).toContain('2 captures: 1 pass, 1 fail\n');
    // The target was left out: the fake (like the server) used the project's only one.
    expect(uploads(s).every((u) => !u.query.has('target'))).toBe(true);
  });

  it('an error verdict outranks a failure: exit 2', async () => {
    const s = await server();
    const r = await run([...common(s), 'fail.wav', 'broken.wav', '--wait']);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stdout).toContain('ERROR    eq.music.sweep  evt2-48k  broken.wav  the capture is 0.2 s long; the stimulus needs 5 s\n');
    expect(r.stdout).toContain('1 fail, 1 error');
  });

  it('an error verdict alone: exit 2 (could not judge), and --json says error with exit code 2', async () => {
    const s = await server();
    const r = await run([...common(s), 'pass.wav', 'broken.wav', '--wait', '--json']);
    expect(r.code, r.stderr).toBe(2);
    const report = JSON.parse(r.stdout) as { outcome: string; exitCode: number; timedOut: boolean };
    expect(report).toMatchObject({ outcome: 'error', exitCode: 2, timedOut: false });
  });

  it('a 503 whose Retry-After is beyond the retry budget: exit 3 (server trouble), not 2', async () => {
    const s = await server({ unavailable: { route: 'builds', times: 10, retryAfter: '3600' } });
    const r = await run([...common(s), 'pass.wav', '--wait']);
    expect(r.code, r.stderr).toBe(3);
    expect(r.stderr).toBe('earmark: Service unavailable: Capture storage is unavailable right now; nothing was stored.\n');
    expect(uploads(s)).toHaveLength(0);
  });

  // The retries alone take 1 + 2 + 4 + 8 s (±20 %), hence its own timeout.
  it('a server that cannot be reached, after its retries: exit 3', { timeout: 60_000 }, async () => {
    // A port that was just free: every connection is refused, so the CLI backs off 1+2+4+8 s and gives up.
    const s = await server();
    const url = s.url;
    await s.close();
    const r = await run(['submit', '--server', url, '--token', FAKE_TOKEN, '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', 'pass.wav', '--wait']);
    expect(r.code, r.stderr).toBe(3);
    expect(r.stderr).toMatch(new RegExp(`^earmark: cannot reach ${url.replace(/[.]/g, '\\.')}.*\\(gave up after 5 tries over \\d+ s\\)$`, 'm'));
  });

  it('retries a 503 after its Retry-After with the whole file again, then succeeds', async () => {
    const s = await server({ unavailable: { route: 'captures', times: 1, retryAfter: '1' } });
    const r = await run([...common(s), 'pass.wav', '--wait']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/POST \/api\/v1\/projects\/kestrel-buds\/builds\/abcdef1234567\/captures: 503 Service unavailable; trying again in 1 s \(try 2 of 5\)/);
    const [refused, accepted] = uploads(s);
    expect(uploads(s)).toHaveLength(2);
    expect((accepted?.at ?? 0) - (refused?.at ?? 0)).toBeGreaterThanOrEqual(950);
    expect(accepted?.body.equals(pass.bytes)).toBe(true);
    expect(accepted?.headers['idempotency-key']).toBe(refused?.headers['idempotency-key']);
  });

  it('a 401 problem: exit 3, its title and detail on one line, no stack, no retry', async () => {
    const s = await server();
    const r = await run(['submit', '--server', s.url, '--token', 'em_wrong_token', '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', 'pass.wav', '--wait']);
    expect(r.code).toBe(3);
    expect(r.stderr).toBe('earmark: Unauthorized: Unknown API token.\n');
    expect(r.stdout).toBe('');
    expect(s.requests).toHaveLength(1);
  });

  it('a 422 (no target named in a project with two) is not retried: exit 3 with the server detail', async () => {
    const s = await server({ targets: ['evt2-48k', 'evt3-96k'] });
    const r = await run([...common(s), 'pass.wav']);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^earmark: Unprocessable content: kestrel-buds has 2 targets; name one with \?target=\.$/m);
    expect(uploads(s)).toHaveLength(1);
  });

  it('--wait gives up after --timeout: exit 3 (not judged yet: retry), naming the capture still pending', async () => {
    const s = await server();
    const started = Date.now();
    const r = await run([...common(s), 'pass.wav', 'slow.wav', '--wait', '--timeout', '1.5']);
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/earmark: timed out after 1\.5 s with 1 of 2 verdicts still pending: eq\.music\.sweep\/evt2-48k slow\.wav \(analysing, capture [0-9a-f-]{36}\)/);
    expect(r.stdout).toMatch(/^PENDING  eq\.music\.sweep  evt2-48k  slow\.wav  \(analysing\)$/m);
    expect(r.stdout).toMatch(/^PASS     eq\.music\.sweep  evt2-48k  pass\.wav$/m);
    // Far below the default --timeout (600 s); the margin is for starting node + tsx on a busy machine.
    expect(Date.now() - started).toBeLessThan(20_000);
  });

  it('--wait holds one request per capture until its verdict (?wait=N) instead of polling', async () => {
    const s = await server({ verdictAfterMs: 2_500 });
    const r = await run([...common(s), 'pass.wav', 'fail.wav', '--wait', '--timeout', '20']);
    expect(r.code, r.stderr).toBe(1);
    expect(s.violations).toEqual([]);
    const reads = s.requests.filter((q) => q.method === 'GET' && q.path.startsWith('/api/v1/captures/'));
    // One held read each: the verdicts arrived within the first hold (the old loop polled 3 times each).
    expect(reads).toHaveLength(2);
    for (const read of reads) {
      const wait = Number(read.query.get('wait'));
      expect(wait).toBeGreaterThanOrEqual(15);
      expect(wait).toBeLessThanOrEqual(20);
    }
  });

  it('--wait asks for holds that end before --timeout, then one last plain read', async () => {
    const s = await server();
    const r = await run([...common(s), 'slow.wav', '--wait', '--timeout', '3']);
    expect(r.code).toBe(3);
    expect(s.violations).toEqual([]);
    const waits = s.requests.filter((q) => q.method === 'GET' && q.path.startsWith('/api/v1/captures/')).map((q) => Number(q.query.get('wait') ?? 0));
    // Held for 2 s (whole seconds before the deadline), then one plain read in the last second.
    expect(waits[0]).toBe(2);
    expect(waits.length).toBeLessThanOrEqual(3);
  });

  it('--junit writes the JUnit XML the server renders', async () => {
    const s = await server();
    const r = await run([...common(s), 'fail.wav', '--wait', '--junit', 'report.xml']);
    expect(r.code, r.stderr).toBe(1);
    expect(readFileSync(join(dir, 'report.xml'), 'utf8')).toBe(s.junitXml(SHA));
    expect(r.stderr).toContain('wrote JUnit report report.xml');
  });

  it('uploads raw float32 with X-Sample-Rate and X-Channels, and --json prints one object', async () => {
    const s = await server();
    const samples = Float32Array.from({ length: 2 * 480 }, (_, i) => Math.sin(i / 7) * 0.1);
    const raw = Buffer.from(samples.buffer);
    writeFileSync(join(dir, 'sim.f32'), raw);
    const r = await run([...common(s), 'sim.f32', '--rate', '48000', '--channels', '2', '--json']);
    expect(r.code, r.stderr).toBe(0);
    const [upload] = uploads(s);
    expect(upload?.headers['content-type']).toBe('application/x-earmark-f32le');
    expect(upload?.headers['x-sample-rate']).toBe('48000');
    expect(upload?.headers['x-channels']).toBe('2');
    expect(upload?.body.equals(raw)).toBe(true);
    const report = JSON.parse(r.stdout) as { outcome: string; exitCode: number; build: { sha: string }; captures: Array<{ file: string; outcome: string; capture: { channels: number; frames: number } }> };
    expect(report).toMatchObject({ outcome: 'pending', exitCode: 0, build: { sha: SHA } });
    expect(report.captures).toHaveLength(1);
    expect(report.captures[0]).toMatchObject({ file: 'sim.f32', outcome: 'pending', capture: { channels: 2, frames: 480 } });
  });

  it('takes the server and token from EARMARK_URL / EARMARK_TOKEN', async () => {
    const s = await server();
    const r = await run(['submit', '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', 'pass.wav'], { EARMARK_URL: s.url, EARMARK_TOKEN: FAKE_TOKEN });
    expect(r.code, r.stderr).toBe(0);
    expect(uploads(s)).toHaveLength(1);
  });

  // The other argument checks run in-process in submit-parts.test.ts; these prove the binary stops before any request.
  it('refuses bad arguments with exit 3 before any request', async () => {
    const s = await server();
    const cases: Array<[string[], Record<string, string>, RegExp]> = [
      [['submit', '--server', s.url, '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', 'pass.wav'], {}, /^earmark: no API token given: pass --token <token> or set EARMARK_TOKEN\n$/],
      [['submit', '--server', s.url, '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', 'pass.wav'], { EARMARK_TOKEN: '' }, /no API token given/],
      [[...common(s).map((a) => (a === SHA ? 'not-a-sha' : a)), 'pass.wav'], {}, /^earmark: --sha: a hex commit SHA of 7 to 64 characters \(got "not-a-sha"\)\n$/],
      [[...common(s), 'pass.wav', 'missing.wav', '--wait', '--junit', 'r.xml'], {}, /^earmark: capture missing\.wav does not exist\n$/],
      [[...common(s), 'pass.wav', '--junit', 'r.xml'], {}, /^earmark: --junit needs --wait/],
    ];
    const results = await Promise.all(cases.map(([args, env]) => run(args, env)));
    results.forEach((r, i) => {
      expect(r.code, r.stderr).toBe(3);
      expect(r.stderr).toMatch(cases[i]?.[2] ?? /never/);
      expect(r.stderr).not.toMatch(/\n\s+at /);
    });
    expect(s.requests).toHaveLength(0);
  });

  it('usage errors (unknown option, missing required option, unknown command) exit 3, help exits 0 and lists the codes', async () => {
    const [unknownOption, missingSha, unknownCommand, noCommand, help] = await Promise.all([
      run(['submit', '--project', PROJECT, '--sha', SHA, '--case', 'eq.music.sweep', '--frobnicate', 'pass.wav']),
      run(['submit', '--project', PROJECT, '--case', 'eq.music.sweep', 'pass.wav']),
      run(['submti', '--project', PROJECT]),
      run([]),
      run(['submit', '--help']),
    ]);
    expect(unknownOption.code, unknownOption.stderr).toBe(3);
    expect(unknownOption.stderr).toContain("unknown option '--frobnicate'");
    expect(missingSha.code, missingSha.stderr).toBe(3);
    expect(missingSha.stderr).toContain("required option '--sha <sha>' not specified");
    expect(unknownCommand.code, unknownCommand.stderr).toBe(3);
    expect(unknownCommand.stderr).toContain("unknown command 'submti'");
    expect(noCommand.code).toBe(3);
    expect(help.code, help.stderr).toBe(0);
    expect(help.stdout).toMatch(/^ {2}2 {2}with --wait: at least one capture could not be judged \(an error verdict\)/m);
    expect(help.stdout).toMatch(/^ {2}3 {2}the run could not finish/m);
  });
});
