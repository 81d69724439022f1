import { Capture } from '@earmark/db';
import { judgeCapture, maskInForce } from '@earmark/domain';
import type { MikroORM } from '@mikro-orm/postgresql';
import { waitForVerdicts } from './audit.js';
import { passingCaptureWav, shaOf, uploadCapture } from './catalog.js';
import { startHealthProbe } from './health-probe.js';
import type { ProcessStack } from './process-stack.js';
import { latencySummary } from './stats.js';

export interface LoadOptions {
  clients: number;
  seconds: number;
  /** Analysis slots behind the queue (worker processes × slots each), for the efficiency. */
  analysisSlots: number;
  /** How long to wait for the backlog to drain after the uploads stop. */
  drainTimeoutMs: number;
  /** New build every this many uploads of a client (a CI pipeline uploads a handful per build). */
  capturesPerBuild?: number;
}

export interface LoadResult {
  accepted: number;
  refused: Record<string, number>;
  /** Refusals without Retry-After or not in problem+json. */
  unclean: number;
  acceptedPerSecond: number;
  upload: ReturnType<typeof latencySummary>;
  submitToVerdict: ReturnType<typeof latencySummary>;
  health: Awaited<ReturnType<ReturnType<typeof startHealthProbe>['stop']>>;
  judged: number;
  verdictsPerSecond: number;
  /** Whether a backlog stood when the uploads stopped (the verdict rate is then a saturation rate). */
  saturated: boolean;
  engineCapturesPerSecond: number;
  efficiency: number;
  shas: string[];
}

/**
 * `clients` CI pipelines upload the same 1 MB capture back to back for `seconds`, each to its own
 * builds, while /api/health is probed every 100 ms; then the backlog drains and the engine alone
 * judges the same capture in this process for comparison.
 */
export async function runLoad(stack: ProcessStack, opts: LoadOptions): Promise<LoadResult> {
  const wav = passingCaptureWav();
  const run = `${Date.now().toString(16)}`.slice(-8);
  const perBuild = opts.capturesPerBuild ?? 5;
  const uploads: { ms: number; startedAt: number; id: string }[] = [];
  const refused: Record<string, number> = {};
  let unclean = 0;
  const shas = new Set<string>();
  const probe = startHealthProbe(stack.url, 100);
  const started = Date.now();
  const deadline = started + opts.seconds * 1000;
  await Promise.all(
    Array.from({ length: opts.clients }, async (_, client) => {
      for (let i = 0; Date.now() < deadline; i++) {
        const sha = shaOf(`${run}${client.toString(16).padStart(2, '0')}`, Math.floor(i / perBuild));
        shas.add(sha);
        const startedAt = Date.now();
        const res = await uploadCapture(stack.url, stack.ciToken, sha, wav);
        if (res.status === 202 && res.capture) uploads.push({ ms: res.ms, startedAt, id: res.capture.id });
        else {
          refused[res.status] = (refused[res.status] ?? 0) + 1;
          if (!res.retryAfter || !res.contentType.startsWith('application/problem+json')) unclean++;
          // A refused upload (429/503 busy) is retried as a CI client would: after Retry-After, at most 2 s.
          await new Promise((r) => setTimeout(r, Math.min(2000, 1000 * Number(res.retryAfter ?? 0.25) || 250)));
        }
      }
    }),
  );
  const uploadSeconds = (Date.now() - started) / 1000;
  const health = await probe.stop();
  const backlogAtStop = await countWithoutVerdict(stack.orm, [...shas]);
  const judged = await waitForVerdicts(stack.orm, [...shas], uploads.length, opts.drainTimeoutMs);

  const verdictTimes = await stack.orm.em.fork().getConnection().execute<{ capture_id: string; at: Date }[]>(
    `select v.capture_id, v.created_at as at from verdict v where v.capture_id in (?)`,
    [uploads.map((u) => u.id)],
  );
  const verdictAt = new Map(verdictTimes.map((v) => [v.capture_id, new Date(v.at).getTime()]));
  const submitToVerdict = uploads.filter((u) => verdictAt.has(u.id)).map((u) => verdictAt.get(u.id)! - u.startedAt);
  const verdictsPerSecond = saturationRate([...verdictAt.values()]);
  const engineCapturesPerSecond = await engineAloneRate(stack.orm, uploads[0]?.id, wav, 4);
  return {
    accepted: uploads.length,
    refused,
    unclean,
    acceptedPerSecond: round(uploads.length / uploadSeconds, 2),
    upload: latencySummary(uploads.map((u) => u.ms)),
    submitToVerdict: latencySummary(submitToVerdict),
    health,
    judged,
    verdictsPerSecond: round(verdictsPerSecond, 2),
    saturated: backlogAtStop > opts.analysisSlots,
    engineCapturesPerSecond: round(engineCapturesPerSecond, 2),
    efficiency: round(verdictsPerSecond / (engineCapturesPerSecond * opts.analysisSlots), 3),
    shas: [...shas],
  };
}

/**
 * Verdicts per second between the 10th and the 90th percentile of verdict times: the steady
 * middle of the run, without the ramp-up or the tail of the drain.
 */
function saturationRate(times: number[]): number {
  if (times.length < 10) return times.length < 2 ? 0 : (times.length - 1) / ((Math.max(...times) - Math.min(...times)) / 1000);
  const sorted = [...times].sort((a, b) => a - b);
  const lo = Math.floor(sorted.length * 0.1);
  const hi = Math.floor(sorted.length * 0.9);
  return (hi - lo) / ((sorted[hi]! - sorted[lo]!) / 1000);
}

async function countWithoutVerdict(orm: MikroORM, shas: string[]): Promise<number> {
  const [row] = await orm.em.fork().getConnection().execute<{ n: string }[]>(
    `select count(*) as n from capture c join build b on b.id = c.build_id where b.sha in (?) and not exists (select 1 from verdict v where v.capture_id = c.id)`,
    [shas],
  );
  return Number(row!.n);
}

/** judgeCapture from @earmark/domain on the same capture in this process: captures per second on one core. */
export async function engineAloneRate(orm: MikroORM, captureId: string | undefined, wav: Uint8Array, reps: number): Promise<number> {
  if (!captureId) return Number.NaN;
  const em = orm.em.fork();
  const capture = await em.findOneOrFail(Capture, { id: captureId }, { populate: ['testCase', 'target'] });
  const mask = await maskInForce(em, capture.testCase, capture.target);
  const first = judgeCapture(wav, capture, mask); // warm-up (JIT, FFT plans)
  if (first.outcome === 'error') throw new Error(`the engine could not judge the load capture: ${first.reason}`);
  const started = performance.now();
  for (let i = 0; i < reps; i++) judgeCapture(wav, capture, mask);
  return reps / ((performance.now() - started) / 1000);
}

const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;
