// The pieces of `earmark submit` that need no server: argument checks and env fallback,
// the Idempotency-Key, the streamed file body, summary formatting and the exit-code rule.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, describe, expect, it } from 'vitest';
import { BuildStatus, type CaptureDto, type CheckResultDto } from '@earmark/contracts';
import { ApiClient } from '../src/api-client/api-client.js';
import { BodySourceError } from '../src/api-client/api-error.js';
import { fileBody } from '../src/submit/file-body.js';
import { describeFailedCheck, summaryLine } from '../src/submit/format-summary.js';
import { idempotencyKey, type CaptureIdentity } from '../src/submit/idempotency-key.js';
import { readSubmitEnv } from '../src/submit/submit-env.js';
import { planSubmit, type SubmitFlags } from '../src/submit/submit-options.js';
import { EXIT, exitCodeFor, exitCodeForStatus, submittedStatus } from '../src/index.js';

const dir = mkdtempSync(join(tmpdir(), 'earmark-submit-parts-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const wav = join(dir, 'a.wav');
writeFileSync(wav, Buffer.from('RIFF....WAVEfmt '));

const flags = (over: Partial<SubmitFlags> = {}): SubmitFlags => ({ project: 'kestrel-buds', sha: 'ABCDEF1', case: 'eq.music.sweep', ...over });

describe('planSubmit', () => {
  it('prefers flags over the environment and lower-cases the SHA', async () => {
    const env = readSubmitEnv({ EARMARK_URL: 'https://env.example.com', EARMARK_TOKEN: 'em_env' });
    const plan = await planSubmit(flags({ token: 'em_flag' }), [wav], env);
    expect(plan).toMatchObject({ server: 'https://env.example.com', token: 'em_flag', build: { sha: 'abcdef1' }, waitTimeoutMs: undefined, raw: undefined });
    expect(plan.files[0]).toMatchObject({ name: 'a.wav', format: 'wav', sizeBytes: 16, sha256: expect.stringMatching(/^[0-9a-f]{64}$/) as unknown });
  });

  it('treats empty EARMARK_* variables as unset', async () => {
    const env = readSubmitEnv({ EARMARK_URL: '  ', EARMARK_TOKEN: '' });
    expect(env).toEqual({ EARMARK_URL: undefined, EARMARK_TOKEN: undefined });
    await expect(planSubmit(flags({ token: 't' }), [wav], env)).rejects.toThrow('no server given: pass --server <url> or set EARMARK_URL');
  });

  it('converts --timeout to ms only with --wait, defaulting to 600 s', async () => {
    const env = readSubmitEnv({ EARMARK_URL: 'http://localhost:1', EARMARK_TOKEN: 't' });
    expect((await planSubmit(flags({ wait: true }), [wav], env)).waitTimeoutMs).toBe(600_000);
    expect((await planSubmit(flags({ wait: true, timeout: '2.5' }), [wav], env)).waitTimeoutMs).toBe(2500);
    await expect(planSubmit(flags({ wait: true, timeout: '0' }), [wav], env)).rejects.toThrow('--timeout: a positive number of seconds (got "0")');
  });

  it('refuses raw files that are not whole frames, and bad keys', async () => {
    const env = readSubmitEnv({ EARMARK_URL: 'http://localhost:1', EARMARK_TOKEN: 't' });
    const raw = join(dir, 'odd.raw');
    writeFileSync(raw, Buffer.alloc(12));
    await expect(planSubmit(flags({ rate: '48000', channels: '2' }), [raw], env)).rejects.toThrow('has 12 bytes, not a whole number of 2-channel float32 frames (8 bytes each)');
    expect((await planSubmit(flags({ rate: '48000', channels: '3' }), [raw], env)).raw).toEqual({ sampleRate: 48000, channels: 3 });
    await expect(planSubmit(flags({ rate: '4000', channels: '1' }), [raw], env)).rejects.toThrow('--rate: at least 8000 Hz (got "4000")');
    await expect(planSubmit(flags({ case: 'EQ Music' }), [wav], env)).rejects.toThrow(/^--case: lower-case letters/);
    await expect(planSubmit(flags({ pipelineUrl: 'not a url' }), [wav], env)).rejects.toThrow(/^--pipeline-url: /);
    await expect(planSubmit(flags({ builtAt: '2026-11-30 22:15' }), [wav], env)).rejects.toThrow(/^--built-at: an ISO 8601 date-time with a time zone/);
    expect((await planSubmit(flags({ builtAt: '2026-11-30T22:15:00Z' }), [wav], env)).build.builtAt).toBe('2026-11-30T22:15:00Z');
    await expect(planSubmit(flags(), [dir + '/'], env)).rejects.toThrow('cannot tell the format');
    await expect(planSubmit(flags(), [join(dir, 'take.mp3')], env)).rejects.toThrow(/^cannot tell the format of .*take\.mp3: name WAV captures \*\.wav/);
    await expect(planSubmit(flags(), [raw], env)).rejects.toThrow(/odd\.raw is raw float32: give its sample rate and channel count with --rate <hz> --channels <n>$/);
    await expect(planSubmit(flags({ rate: '48000' }), [raw], env)).rejects.toThrow('raw float32 captures need both --rate and --channels');
    await expect(planSubmit(flags({ rate: '48000', channels: '1' }), [wav], env)).rejects.toThrow('--rate and --channels apply to raw float32 captures (*.f32, *.raw) only');
    await expect(planSubmit(flags(), [join(dir, 'missing.wav')], env)).rejects.toThrow(/^capture .*missing\.wav does not exist$/);
    await expect(planSubmit(flags(), [], env)).rejects.toThrow('give at least one capture file');
    await expect(planSubmit(flags({ wait: true, junit: join(dir, 'nope', 'r.xml') }), [wav], env)).rejects.toThrow(/directory .*nope does not exist or is not writable/);
  });
});

describe('idempotencyKey', () => {
  const base: CaptureIdentity = { project: 'kestrel-buds', sha: 'abcdef1', testCase: 'eq.music.sweep', target: 'evt2-48k', fileSha256: 'a'.repeat(64), format: 'audio/wav' };

  it('is the same for the same capture and differs when any part differs', () => {
    const key = idempotencyKey(base);
    expect(key).toMatch(/^emk1-[0-9a-f]{64}$/);
    expect(idempotencyKey({ ...base })).toBe(key);
    const variants: CaptureIdentity[] = [
      { ...base, project: 'other-project' },
      { ...base, sha: 'abcdef2' },
      { ...base, testCase: 'eq.music.pink' },
      { ...base, target: undefined },
      { ...base, fileSha256: 'b'.repeat(64) },
      { ...base, format: 'application/x-earmark-f32le;rate=48000;channels=2' },
      // Fields must not run into each other: moving a character across a boundary changes the key.
      { ...base, testCase: 'eq.music.swee', target: 'pevt2-48k' },
    ];
    const keys = new Set(variants.map(idempotencyKey));
    expect(keys.size).toBe(variants.length);
    expect(keys.has(key)).toBe(false);
  });
});

describe('fileBody', () => {
  it('streams exactly the file and counts the bytes as they are taken', async () => {
    const path = join(dir, 'big.f32');
    const bytes = Buffer.alloc(600_000);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 31) & 0xff;
    writeFileSync(path, bytes);
    const counts: number[] = [];
    const received = Buffer.from(await new Response(fileBody(path, (n) => counts.push(n))).arrayBuffer());
    expect(received.equals(bytes)).toBe(true);
    expect(counts.at(-1)).toBe(600_000);
    expect(counts.length).toBeGreaterThan(1);
    expect([...counts].sort((a, b) => a - b)).toEqual(counts);
  });

  it('reports a capture that vanished before the upload as a local error, which the client does not retry', async () => {
    const s = createServer((req, res) => req.resume().on('end', () => res.end('{}')));
    await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', resolve));
    const client = new ApiClient({ server: `http://127.0.0.1:${(s.address() as AddressInfo).port}`, token: 't', retry: { maxTries: 3, budgetMs: 5000, baseDelayMs: 10, maxDelayMs: 10 } });
    let made = 0;
    const error = await client
      .send({ method: 'POST', path: '/x', body: () => (made++, fileBody(join(dir, 'gone.wav'), () => undefined)) })
      .catch((e: unknown) => e)
      .finally(() => s.close());
    expect(error).toBeInstanceOf(BodySourceError);
    expect((error as Error).message).toMatch(/^cannot read capture .*gone\.wav while uploading it: ENOENT$/);
    expect(made).toBe(1);
  });
});

describe('summary', () => {
  const check: CheckResultDto = { id: 'mag.env', kind: 'magnitude-envelope', label: null, pass: false, measured: 4.2, limit: 2.9, margin: -1.3, unit: 'dB', worstHz: 8020 };

  it('describes a failed check in the shared formatter\'s words', () => {
    expect(describeFailedCheck(check)).toBe('mag.env: measured 4.20 dB, limit 2.90 dB, margin \u22121.30 dB at 8.02 kHz');
    expect(describeFailedCheck({ ...check, id: 'latency', label: 'Latency', unit: 'ms', worstHz: null, measured: null, margin: -0.5 })).toBe('Latency: limit 2.900 ms, margin \u22120.500 ms');
  });

  it('writes one line per capture with its verdict word', () => {
    const capture = {
      testCase: 'eq.music.sweep',
      target: 'evt2-48k',
      status: 'done',
      verdict: { outcome: 'fail', reason: null, engineVersion: '1', maskRevisionId: null, maskRevision: null, createdAt: '', checks: [{ ...check, id: 'thd', pass: true }, check] },
    } as unknown as CaptureDto;
    const file = { path: 'x/right.wav', name: 'right.wav', format: 'wav' as const, sizeBytes: 1, sha256: '' };
    expect(summaryLine({ file, capture })).toBe('FAIL     eq.music.sweep  evt2-48k  right.wav  mag.env: measured 4.20 dB, limit 2.90 dB, margin \u22121.30 dB at 8.02 kHz');
    expect(summaryLine({ file, capture: { ...capture, status: 'error', verdict: null } })).toBe('ERROR    eq.music.sweep  evt2-48k  right.wav  the analysis failed');
    expect(summaryLine({ file, capture: { ...capture, status: 'queued', verdict: null } })).toBe('PENDING  eq.music.sweep  evt2-48k  right.wav  (queued)');
  });
});

describe('exitCodeFor (the build-status rule over the submitted captures)', () => {
  const capture = (status: CaptureDto['status'], outcome: 'pass' | 'fail' | 'error' | null): CaptureDto =>
    ({ status, verdict: outcome === null ? null : { outcome, checks: [] } }) as unknown as CaptureDto;
  const passed = capture('done', 'pass');
  const failed = capture('done', 'fail');
  const errored = capture('error', 'error');

  it('with --wait: 0 pass, 1 fail, 2 error verdict, 3 while any capture is not judged yet', () => {
    expect(exitCodeFor([passed, passed], true)).toBe(EXIT.ok);
    expect(exitCodeFor([passed, failed], true)).toBe(EXIT.fail);
    expect(exitCodeFor([passed, errored], true)).toBe(EXIT.error);
    expect(exitCodeFor([passed, capture('queued', null)], true)).toBe(EXIT.incomplete);
    expect(exitCodeFor([passed, capture('analysing', null)], true)).toBe(EXIT.incomplete);
    expect([EXIT.ok, EXIT.fail, EXIT.error, EXIT.incomplete]).toEqual([0, 1, 2, 3]);
  });

  it('an error outranks a failure: one failing and one erroring capture exit 2', () => {
    expect(exitCodeFor([failed, errored], true)).toBe(2);
    // A capture whose analysis broke without a verdict counts as an error too.
    expect(exitCodeFor([failed, capture('error', null)], true)).toBe(2);
  });

  it('without --wait: 0 once every upload was accepted, whatever the verdicts', () => {
    expect(exitCodeFor([failed, errored, capture('queued', null)], false)).toBe(0);
  });

  it('maps each build status to one code and agrees with the rule in contracts', () => {
    expect(BuildStatus.options.map((s) => [s, exitCodeForStatus(s)])).toEqual([
      ['pending', 3],
      ['running', 3],
      ['pass', 0],
      ['fail', 1],
      ['error', 2],
    ]);
    expect(submittedStatus([passed, failed, errored])).toBe('error');
  });
});
