import type { CaptureDto, VerdictOutcome } from '@earmark/contracts';

export type CaptureOutcome = VerdictOutcome | 'pending';

/**
 * Where a capture stands. A capture whose analysis broke (status `error`) counts as an error
 * even if the server has not attached a verdict to it.
 */
export function captureOutcome(capture: CaptureDto): CaptureOutcome {
  if (capture.verdict) return capture.verdict.outcome;
  return capture.status === 'error' ? 'error' : 'pending';
}

export const isSettled = (capture: CaptureDto): boolean => captureOutcome(capture) !== 'pending';
