import { setTimeout as sleep } from 'node:timers/promises';
import type { CaptureDto } from '@earmark/contracts';
import type { EarmarkApi } from '../api-client/earmark-api.js';
import { isSettled } from './capture-outcome.js';
import type { SubmitProgress } from './submit-progress.js';

export interface WaitOptions {
  timeoutMs: number;
  progress: SubmitProgress;
  /** First pause between polls; grows by half each round up to maxIntervalMs. */
  firstIntervalMs?: number;
  maxIntervalMs?: number;
}

export interface WaitResult {
  /** Latest state of every capture, in upload order. */
  captures: CaptureDto[];
  timedOut: boolean;
}

/**
 * Polls each capture without a verdict until all have one or the timeout passes. The
 * interval starts short (most analyses take a second or two) and backs off to spare the
 * server when a queue is long.
 */
export async function waitForVerdicts(api: EarmarkApi, uploaded: CaptureDto[], options: WaitOptions): Promise<WaitResult> {
  const deadline = Date.now() + options.timeoutMs;
  const maxInterval = options.maxIntervalMs ?? 5_000;
  let interval = options.firstIntervalMs ?? 1_000;
  const captures = [...uploaded];
  const total = captures.length;
  const settledCount = (): number => captures.filter(isSettled).length;

  options.progress.waitStarted(total, options.timeoutMs);
  let reported = settledCount();
  if (reported > 0) options.progress.waitUpdate(reported, total);
  try {
    while (reported < total) {
      const left = deadline - Date.now();
      if (left <= 0) return { captures, timedOut: true };
      await sleep(Math.min(interval, left));
      interval = Math.min(maxInterval, interval * 1.5);
      try {
        await Promise.all(
          captures.map(async (capture, i) => {
            if (!isSettled(capture)) captures[i] = await api.getCapture(capture.id, deadline);
          }),
        );
      } catch (error) {
        // Retries that ran into the deadline are a timeout, not a server fault.
        if (Date.now() >= deadline) return { captures, timedOut: true };
        throw error;
      }
      const now = settledCount();
      if (now !== reported) options.progress.waitUpdate(now, total);
      reported = now;
    }
    return { captures, timedOut: false };
  } finally {
    options.progress.stop();
  }
}
