import { setTimeout as sleep } from 'node:timers/promises';
import type { CaptureDto } from '@earmark/contracts';
import type { EarmarkApi } from '../api-client/earmark-api.js';
import { isSettled } from './capture-outcome.js';
import type { SubmitProgress } from './submit-progress.js';

/** The longest hold the server grants (`?wait=`, docs/ci.md). */
export const SERVER_MAX_HOLD_S = 30;

export interface WaitOptions {
  timeoutMs: number;
  progress: SubmitProgress;
  /** Longest hold asked of the server per request; default the server's maximum. */
  maxHoldS?: number;
  /**
   * Pause before asking again when the server answered early without a final verdict (it holds
   * no more requests right now, or predates `?wait`); grows by half each time up to maxIntervalMs.
   */
  firstIntervalMs?: number;
  maxIntervalMs?: number;
}

export interface WaitResult {
  /** Latest state of every capture, in upload order. */
  captures: CaptureDto[];
  timedOut: boolean;
}

/** An answer this much sooner than the hold asked for did not wait for anything. */
const EARLY_SLACK_MS = 500;
/** Time kept for a held answer to travel back before the deadline. */
const ANSWER_MARGIN_MS = 250;

/**
 * Waits for every capture's verdict with one held request per capture at a time
 * (`GET /api/v1/captures/{id}?wait=N`): the server answers as soon as the verdict is recorded,
 * so a capture judged after 4 minutes costs about 8 requests, not 50 polls. Ends at the timeout.
 */
export async function waitForVerdicts(api: EarmarkApi, uploaded: CaptureDto[], options: WaitOptions): Promise<WaitResult> {
  const deadline = Date.now() + options.timeoutMs;
  const maxHoldS = Math.min(options.maxHoldS ?? SERVER_MAX_HOLD_S, SERVER_MAX_HOLD_S);
  const firstInterval = options.firstIntervalMs ?? 1_000;
  const maxInterval = options.maxIntervalMs ?? 5_000;
  const captures = [...uploaded];
  const total = captures.length;
  const settledCount = (): number => captures.filter(isSettled).length;
  let reported = settledCount();
  const report = () => {
    const now = settledCount();
    if (now !== reported) options.progress.waitUpdate(now, total);
    reported = now;
  };

  async function follow(i: number): Promise<void> {
    let pause = firstInterval;
    while (!isSettled(captures[i]!)) {
      const left = deadline - Date.now();
      if (left <= 0) return;
      // Whole seconds that end before the deadline, leaving the answer time to arrive; under a
      // second left, one last plain read.
      const waitS = Math.min(maxHoldS, Math.max(0, Math.floor((left - ANSWER_MARGIN_MS) / 1000)));
      const asked = Date.now();
      captures[i] = await api.getCapture(captures[i]!.id, { deadline, waitS });
      report();
      if (isSettled(captures[i]!)) return;
      if (Date.now() - asked < waitS * 1000 - EARLY_SLACK_MS || waitS === 0) {
        await sleep(Math.max(0, Math.min(pause, deadline - Date.now())));
        pause = Math.min(maxInterval, pause * 1.5);
      } else {
        pause = firstInterval;
      }
    }
  }

  options.progress.waitStarted(total, options.timeoutMs);
  if (reported > 0) options.progress.waitUpdate(reported, total);
  try {
    await Promise.all(captures.map((_, i) => follow(i)));
    return { captures, timedOut: settledCount() < total };
  } catch (error) {
    // Retries that ran into the deadline are a timeout, not a server fault.
    if (Date.now() >= deadline) return { captures, timedOut: true };
    throw error;
  } finally {
    options.progress.stop();
  }
}
