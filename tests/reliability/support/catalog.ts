import { StimulusSpec, type CaptureDto, type MaskCheckInput } from '@earmark/contracts';
import { MaskRevision, Target, TestCase, testCaseSettings, type RoleFixture } from '@earmark/db';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { delay } from '@earmark/dsp/testing';
import type { MikroORM } from '@mikro-orm/postgresql';

export const FS = 48000;
export const CASE = 'load.sweep';
export const SOAK_CASE = 'soak.sweep';
export const TARGET = 'board';
/** 5 s sweep and 0.46 s of silence as float32 mono: 262,080 samples, a 1.0 MB WAV per capture. */
export const sweepSpec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 5, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.46, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
/** The soak's short capture (0.5 s, 96 KB): many of them, to test bookkeeping rather than the engine. */
export const shortSweepSpec = StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 0.4, from: 20, to: 20000, levelDbfs: -12, silenceSeconds: 0.1, fadeInSeconds: 0.01, fadeOutSeconds: 0.01 });
const checks: MaskCheckInput[] = [
  { id: 'response', kind: 'magnitude-envelope', label: 'Flat ±1 dB', measure: 'transfer', referenceHz: 1000, upper: [{ hz: 100, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 100, db: -1 }, { hz: 16000, db: -1 }] },
  { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -16, max: -10 },
];

/** Target `board`, test cases `load.sweep` and `soak.sweep` of alpha-dsp, each with an approved mask revision. */
export async function seedCatalog(orm: MikroORM, fixture: RoleFixture): Promise<void> {
  const em = orm.em.fork();
  em.create(Target, { project: fixture.project.id, key: TARGET, name: 'Board', sampleRate: FS });
  for (const [key, stimulus] of [[CASE, sweepSpec], [SOAK_CASE, shortSweepSpec]] as const) {
    const testCase = em.create(TestCase, { project: fixture.project.id, key, name: key, stimulus });
    em.create(MaskRevision, { testCase, revision: 1, state: 'approved', checks, settings: testCaseSettings(testCase), author: fixture.users.engineer.id, reviewer: fixture.users.qa_manager.id });
  }
  await em.flush();
}

/** A passing capture (the stimulus with 37 samples of latency): 1.0 MB of `load.sweep` by default. */
export function passingCaptureWav(spec: StimulusSpec = sweepSpec): Buffer<ArrayBuffer> {
  const stimulus = Float64Array.from(generateStimulus(spec).channels[0]!, Math.fround);
  return Buffer.from(encodeWav([delay(stimulus, 37)], FS, { encoding: 'float', bitsPerSample: 32 }));
}

export interface UploadResult {
  status: number;
  ms: number;
  capture: CaptureDto | null;
  /** The raw answer, for problem+json checks. */
  contentType: string;
  /** The Retry-After header of a refusal, if any. */
  retryAfter: string | null;
  text: string;
}

/** One CI upload of a WAV to build `sha` (raw body). Network errors come back as status 0. */
export async function uploadCapture(
  baseUrl: string,
  token: string,
  sha: string,
  wav: Uint8Array<ArrayBuffer>,
  opts: { testCase?: string; headers?: Record<string, string>; signal?: AbortSignal } = {},
): Promise<UploadResult> {
  const started = performance.now();
  const headers = opts.headers ?? {};
  try {
    const res = await fetch(`${baseUrl}/api/v1/projects/alpha-dsp/builds/${sha}/captures?testCase=${opts.testCase ?? CASE}&target=${TARGET}`, {
      signal: opts.signal,
      method: 'POST',
      headers: { authorization: `Bearer ${token}`, 'content-type': 'audio/wav', ...headers },
      body: wav,
    });
    const text = await res.text();
    const contentType = res.headers.get('content-type') ?? '';
    const capture = res.status === 202 || res.status === 200 ? (JSON.parse(text) as CaptureDto) : null;
    return { status: res.status, ms: performance.now() - started, capture, contentType, retryAfter: res.headers.get('retry-after'), text };
  } catch (error) {
    return { status: 0, ms: performance.now() - started, capture: null, contentType: '', retryAfter: null, text: String((error as Error).cause ?? error) };
  }
}

/** A 7-to-40 hex-digit commit SHA of build number `n` of a run. */
export function shaOf(run: string, n: number): string {
  return `${run}${n.toString(16).padStart(8, '0')}`.slice(0, 40);
}
