import { constants } from 'node:fs';
import { access, stat } from 'node:fs/promises';
import { dirname } from 'node:path';
import { CommitSha, ProjectKey, TargetKey, TestCaseKey, UpsertBuildRequest } from '@earmark/contracts';
import { z } from 'zod';
import { inspectCaptureFile, type CaptureFile } from './capture-file.js';
import type { SubmitEnv } from './submit-env.js';

/** The flags as commander hands them over (strings, unchecked). */
export interface SubmitFlags {
  server?: string;
  token?: string;
  project: string;
  sha: string;
  branch?: string;
  label?: string;
  pipelineUrl?: string;
  builtAt?: string;
  case: string;
  target?: string;
  wait?: boolean;
  timeout?: string;
  junit?: string;
  rate?: string;
  channels?: string;
  json?: boolean;
}

export interface RawFormat {
  sampleRate: number;
  channels: number;
}

/** Everything `earmark submit` will do, checked before the first request. */
export interface SubmitPlan {
  server: string;
  token: string;
  project: string;
  build: UpsertBuildRequest;
  testCase: string;
  target: string | undefined;
  files: CaptureFile[];
  raw: RawFormat | undefined;
  /** Undefined without --wait. */
  waitTimeoutMs: number | undefined;
  junitPath: string | undefined;
  json: boolean;
}

export const DEFAULT_TIMEOUT_SECONDS = 600;

function check<S extends z.ZodType>(schema: S, value: unknown, flag: string): z.output<S> {
  const parsed = schema.safeParse(value);
  if (parsed.success) return parsed.data;
  throw new Error(`${flag}: ${parsed.error.issues[0]?.message ?? 'not valid'} (got "${String(value)}")`);
}

const ServerUrl = z
  .string()
  .refine((v) => URL.canParse(v) && ['http:', 'https:'].includes(new URL(v).protocol), 'an http(s) URL such as https://earmark.example.com');
const Token = z.string().regex(/^\S+$/, 'one word without spaces');
const SampleRate = z.coerce.number().int('a whole number of Hz').min(8000, 'at least 8000 Hz').max(192_000, 'at most 192000 Hz');
const Channels = z.coerce.number().int('a whole number').min(1, 'at least 1').max(8, 'at most 8');
const TimeoutSeconds = z.coerce.number().positive('a positive number of seconds').max(86_400, 'at most 86400 seconds (one day)');

function resolveCredentials(flags: SubmitFlags, env: SubmitEnv): { server: string; token: string } {
  const server = flags.server ?? env.EARMARK_URL;
  if (server === undefined) throw new Error('no server given: pass --server <url> or set EARMARK_URL');
  const token = flags.token ?? env.EARMARK_TOKEN;
  if (token === undefined) throw new Error('no API token given: pass --token <token> or set EARMARK_TOKEN');
  return { server: check(ServerUrl, server, '--server'), token: check(Token, token, '--token') };
}

async function checkJunitPath(path: string): Promise<void> {
  const dir = dirname(path);
  try {
    if (!(await stat(dir)).isDirectory()) throw new Error('not a directory');
    await access(dir, constants.W_OK);
  } catch {
    throw new Error(`cannot write --junit ${path}: directory ${dir} does not exist or is not writable`);
  }
}

/**
 * Checks every flag and file so that a mistake costs no request: credentials, keys and SHA,
 * raw-format flags, the timeout, the JUnit path, and each capture (exists, readable, not
 * empty, a whole number of raw frames).
 * @throws Error with one line that names the flag or file.
 */
export async function planSubmit(flags: SubmitFlags, files: string[], env: SubmitEnv): Promise<SubmitPlan> {
  const { server, token } = resolveCredentials(flags, env);
  const project = check(ProjectKey, flags.project, '--project');
  const build: UpsertBuildRequest = { sha: check(CommitSha, flags.sha.toLowerCase(), '--sha') };
  if (flags.branch !== undefined) build.branch = check(UpsertBuildRequest.shape.branch, flags.branch, '--branch');
  if (flags.label !== undefined) build.label = check(UpsertBuildRequest.shape.label, flags.label, '--label');
  if (flags.pipelineUrl !== undefined) build.pipelineUrl = check(UpsertBuildRequest.shape.pipelineUrl, flags.pipelineUrl, '--pipeline-url');
  if (flags.builtAt !== undefined) build.builtAt = check(UpsertBuildRequest.shape.builtAt, flags.builtAt, '--built-at');
  const testCase = check(TestCaseKey, flags.case, '--case');
  const target = flags.target === undefined ? undefined : check(TargetKey, flags.target, '--target');

  if (flags.junit !== undefined && flags.wait !== true) {
    throw new Error('--junit needs --wait: the report holds verdicts, which exist only after the analysis');
  }
  const waitTimeoutMs = flags.wait === true ? check(TimeoutSeconds, flags.timeout ?? DEFAULT_TIMEOUT_SECONDS, '--timeout') * 1000 : undefined;
  if (flags.junit !== undefined) await checkJunitPath(flags.junit);

  if ((flags.rate === undefined) !== (flags.channels === undefined)) throw new Error('raw float32 captures need both --rate and --channels');
  const raw = flags.rate === undefined || flags.channels === undefined ? undefined : { sampleRate: check(SampleRate, flags.rate, '--rate'), channels: check(Channels, flags.channels, '--channels') };

  if (files.length === 0) throw new Error('give at least one capture file');
  const inspected: CaptureFile[] = [];
  for (const path of files) inspected.push(await inspectCaptureFile(path));
  const rawFiles = inspected.filter((f) => f.format === 'raw-f32');
  if (rawFiles.length > 0 && raw === undefined) {
    throw new Error(`${rawFiles[0]?.path} is raw float32: give its sample rate and channel count with --rate <hz> --channels <n>`);
  }
  if (rawFiles.length === 0 && raw !== undefined) throw new Error('--rate and --channels apply to raw float32 captures (*.f32, *.raw) only; WAV files carry their own');
  for (const file of rawFiles) {
    const frameBytes = 4 * (raw?.channels ?? 1);
    if (file.sizeBytes % frameBytes !== 0) {
      throw new Error(`${file.path} has ${file.sizeBytes} bytes, not a whole number of ${raw?.channels}-channel float32 frames (${frameBytes} bytes each)`);
    }
  }
  return { server, token, project, build, testCase, target, files: inspected, raw, waitTimeoutMs, junitPath: flags.junit, json: flags.json === true };
}
